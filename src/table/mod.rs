//! Standard-potential tables: reading couple files, and the loaded table of couples.

pub mod record;

pub use record::{CoupleFile, CoupleRecord, Field, FileFormat, ProblemKind, ReadProblem};
