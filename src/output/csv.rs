//! CSV of a discharge curve: one row per point, a header row naming each column with its unit.

use crate::discharge::Discharge;

/// The column names: `soc`, `charge_Ah`, `e_V`, `extent_mol`, `ln_q`, `solvent_kg`, `a_H2O`, then
/// `m_<species>_mol_per_kg` for every tracked dissolved species.
pub fn discharge_header(curve: &Discharge) -> Vec<String> {
    let mut header: Vec<String> = [
        "soc",
        "charge_Ah",
        "e_V",
        "extent_mol",
        "ln_q",
        "solvent_kg",
        "a_H2O",
    ]
    .iter()
    .map(|s| (*s).to_owned())
    .collect();
    header.extend(
        curve
            .solutes
            .iter()
            .map(|s| format!("m_{}_mol_per_kg", s.ascii())),
    );
    header
}

/// The curve as CSV text (full f64 precision, so a reader gets back the same numbers).
pub fn discharge_csv(curve: &Discharge) -> String {
    let mut writer = csv::Writer::from_writer(Vec::new());
    // Writing into memory cannot fail.
    let _ = writer.write_record(discharge_header(curve));
    for p in &curve.points {
        let mut row = vec![
            p.state_of_charge.to_string(),
            p.charge_amp_hours.to_string(),
            p.e_volts.to_string(),
            p.extent_mol.to_string(),
            p.ln_q.to_string(),
            p.solvent_kg.map_or_else(String::new, |kg| kg.to_string()),
            p.water_activity.to_string(),
        ];
        row.extend(p.molalities.iter().map(|m| m.to_string()));
        let _ = writer.write_record(&row);
    }
    String::from_utf8(writer.into_inner().unwrap_or_default()).unwrap_or_default()
}
