//! couplet: electrode reactions and cell figures from ordinary chemical notation.
//!
//! The library reads half-reactions as chemists type them, balances them exactly, assigns
//! oxidation numbers and computes cell potentials and related figures from cited tables.
//!
//! ```
//! use couplet::notation::{parse_species, Equation};
//!
//! let permanganate = parse_species("MnO4-").unwrap();
//! assert_eq!(permanganate.charge(), -1);
//! assert_eq!(permanganate.unicode(), "MnO₄⁻");
//!
//! let half: Equation = "MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O(l)".parse().unwrap();
//! assert!(half.has_electrons());
//! ```
#![deny(missing_docs)]

pub mod activity;
pub mod balance;
pub mod capacity;
pub mod cell;
pub mod check;
pub mod composition;
pub mod constants;
pub mod discharge;
pub mod electrode;
pub mod elements;
pub mod export;
pub mod figures;
pub mod kw;
pub mod nernst;
pub mod notation;
pub mod output;
pub mod oxidation;
pub mod predominance;
pub mod quotient;
pub mod reaction;
pub mod scale;
pub mod table;
pub mod thermo;
