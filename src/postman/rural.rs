//! Rural postman (placeholder while being written).
