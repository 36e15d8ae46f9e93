//! The published balancing corpus (`tests/data/balance_corpus.json`) for the unit tests that
//! check a fast path of the analysis or the half-reaction split against the general one, and
//! lines generated from redox couples.

use crate::balance::Medium;

const CORPUS: &str = include_str!("../../tests/data/balance_corpus.json");

/// Every corpus input with the medium it is balanced in.
pub(crate) fn lines() -> Vec<(String, Medium)> {
    let corpus: serde_json::Value = serde_json::from_str(CORPUS).unwrap();
    corpus
        .as_array()
        .unwrap()
        .iter()
        .map(|entry| {
            let medium = entry["medium"].as_str().unwrap().parse().unwrap();
            (entry["input"].as_str().unwrap().to_owned(), medium)
        })
        .collect()
}

/// Redox couples as (oxidised form, reduced form), the usual ones of general-chemistry tables
/// (common practice). Every ordered pair makes one whole skeleton, so each half comes back
/// with many partners and at many places in the line.
const COUPLES: [(&str, &str); 14] = [
    ("MnO4-", "Mn2+"),
    ("Cr2O7^2-", "Cr3+"),
    ("Fe3+", "Fe2+"),
    ("Cu2+", "Cu"),
    ("Zn2+", "Zn"),
    ("NO3-", "NO"),
    ("H2O2", "H2O"),
    ("Cl2", "Cl-"),
    ("I2", "I-"),
    ("SO4^2-", "SO2"),
    ("Sn4+", "Sn2+"),
    ("Ag+", "Ag"),
    ("BrO3-", "Br-"),
    ("PbO2", "PbSO4"),
];

/// Generated whole skeletons: every ordered pair of two couples (the first's oxidised form
/// takes electrons from the second's reduced form), in acid and in base.
pub(crate) fn pairs_of_couples() -> Vec<(String, Medium)> {
    let mut lines = Vec::new();
    for medium in [Medium::Acid, Medium::Base] {
        for (oxidant, reduced) in COUPLES {
            for (oxidised, reductant) in COUPLES {
                if oxidant != oxidised {
                    let line = format!("{oxidant} + {reductant} -> {reduced} + {oxidised}");
                    lines.push((line, medium));
                }
            }
        }
    }
    lines
}
