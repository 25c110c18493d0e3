//! Outputs for people: route sheets, GeoJSON and SVG maps.
