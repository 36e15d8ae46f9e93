//! The published balancing corpus (`tests/data/balance_corpus.json`) for the unit tests that
//! check a fast path of the analysis or the half-reaction split against the general one.

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
