//! The one integration-test binary: a module per area, each with its own `check` helper.
//!
//! Every expected value that comes from outside the project names its source beside it.

mod activity;
mod balance;
mod capacity;
mod cell;
mod check;
mod cli;
mod discharge;
mod electrode;
mod elements;
mod export;
mod nernst;
mod notation;
mod oxidation;
mod stability;
mod stoichiometry;
mod table;
mod thermo;
