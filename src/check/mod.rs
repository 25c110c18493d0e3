//! Independent plan checker: verifies a plan from the instance alone.
