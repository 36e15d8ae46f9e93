//! The one integration-test binary: a module per area, each with its own `check` helper.
//!
//! Every expected value that comes from outside the project names its source beside it.

mod balance;
mod check;
mod elements;
mod notation;
