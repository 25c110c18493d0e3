//! Lower bounds on the cost of any plan.
