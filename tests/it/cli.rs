//! The command line as a new user meets it: output to closed pipes and full disks, scales,
//! refused inputs and the consistency of the commands' output.

use std::process::{Command, Stdio};

/// One invocation of every command, each writing something to standard output.
const EVERY_COMMAND: &[&[&str]] = &[
    &["parse", "CuSO4*5H2O"],
    &["parse", "--json", "H2O"],
    &["balance", "--medium", "acid", "MnO4- + Fe2+ -> Mn2+ + Fe3+"],
    &["balance", "--json", "H2 + O2 -> H2O"],
    &["oxidation", "Fe3O4"],
    &["oxidation", "--json", "Fe3O4"],
    &["table"],
    &["table", "--json"],
    &["cell", "--cathode", "Cu2+/Cu", "--anode", "Zn2+/Zn"],
    &[
        "cell",
        "--json",
        "--cathode",
        "Cu2+/Cu",
        "--anode",
        "Zn2+/Zn",
    ],
    &["derive", "Fe3+/Fe2+", "Fe2+/Fe"],
    &["ph-line", "MnO4-/Mn2+"],
    &["capacity", "Zn2+/Zn"],
    &[
        "capacity",
        "--json",
        "--cathode",
        "PbO2/PbSO4",
        "--anode",
        "PbSO4/Pb",
    ],
    &[
        "discharge",
        "--cathode",
        "Cu2+/Cu",
        "--anode",
        "Zn2+/Zn",
        "--amount",
        "Zn=1",
        "--amount",
        "Cu2+=0.5",
        "--amount",
        "Zn2+=0.01",
        "--solvent-kg",
        "1",
    ],
    &["check", "tests/data/check/clean.toml"],
    &["check", "--format", "sarif", "tests/data/check/clean.toml"],
    &["check", "--format", "json", "tests/data/check/clean.toml"],
    &["--help"],
];

fn couplet() -> Command {
    Command::new(assert_cmd::cargo::cargo_bin!("couplet"))
}

#[test]
fn a_full_disk_is_an_error_with_exit_two_for_every_command() {
    for args in EVERY_COMMAND {
        let full = std::fs::OpenOptions::new()
            .write(true)
            .open("/dev/full")
            .expect("/dev/full exists on Linux");
        let output = couplet().args(*args).stdout(full).output().unwrap();
        let stderr = String::from_utf8_lossy(&output.stderr);
        assert_eq!(output.status.code(), Some(2), "{args:?}: {stderr}");
        assert!(stderr.contains("error: cannot write"), "{args:?}: {stderr}");
        assert!(!stderr.contains("panicked"), "{args:?}: {stderr}");
    }
}

#[test]
fn a_closed_pipe_ends_the_output_quietly() {
    for args in EVERY_COMMAND {
        let mut child = couplet()
            .args(*args)
            .stdout(Stdio::piped())
            .stderr(Stdio::piped())
            .spawn()
            .unwrap();
        // The reader goes away before the command writes (as `| head -0` would).
        drop(child.stdout.take());
        let output = child.wait_with_output().unwrap();
        let stderr = String::from_utf8_lossy(&output.stderr);
        assert!(!stderr.contains("panicked"), "{args:?}: {stderr}");
        assert!(!stderr.contains("cannot write"), "{args:?}: {stderr}");
        // The command's own status survives: all of these succeed.
        assert_eq!(output.status.code(), Some(0), "{args:?}: {stderr}");
    }
}

#[test]
fn a_dry_run_fails_while_errors_would_remain() {
    let dir = tempfile::tempdir().unwrap();
    // Invented entries: one --fix can balance (a dropped water), one it never touches (an
    // oxidation written where a reduction belongs, CPL203).
    let fixable = "[[couple]]\nreaction = \"MnO4- + 8 H+ + 5 e- -> Mn2+ + 3 H2O(l)\"\ne0 = 1.51\nsource = \"invented\"\n";
    let stuck =
        "[[couple]]\nreaction = \"Zn(s) -> Zn2+ + 2 e-\"\ne0 = 0.76\nsource = \"invented\"\n";
    for (text, status) in [(fixable.to_owned(), 0), (format!("{fixable}\n{stuck}"), 1)] {
        let path = dir.path().join("t.toml");
        std::fs::write(&path, &text).unwrap();
        let output = couplet()
            .args(["check", "--fix", "--dry-run"])
            .arg(&path)
            .output()
            .unwrap();
        assert_eq!(output.status.code(), Some(status), "{text}");
        assert!(String::from_utf8_lossy(&output.stdout).contains("+reaction"));
        assert_eq!(std::fs::read_to_string(&path).unwrap(), text);
    }
}

/// Runs couplet; returns (status, stdout, stderr).
fn run(args: &[&str]) -> (i32, String, String) {
    let output = couplet().args(args).output().unwrap();
    (
        output.status.code().unwrap_or(-1),
        String::from_utf8_lossy(&output.stdout).into_owned(),
        String::from_utf8_lossy(&output.stderr).into_owned(),
    )
}

fn json(args: &[&str]) -> serde_json::Value {
    let (status, stdout, stderr) = run(args);
    assert_eq!(status, 0, "{args:?}: {stderr}");
    serde_json::from_str(&stdout).unwrap_or_else(|e| panic!("{args:?}: {e}: {stdout}"))
}

/// The E° column of the first row of `couplet table`.
fn table_potential(args: &[&str]) -> f64 {
    let (status, stdout, stderr) = run(args);
    assert_eq!(status, 0, "{stderr}");
    let row = stdout.lines().nth(1).expect("a row under the header");
    row.split_whitespace().nth(1).unwrap().parse().unwrap()
}

#[test]
fn oxygen_reads_its_standard_potential_against_rhe_at_every_ph() {
    // O2 + 4 H+ + 4 e- -> 2 H2O: 1.229 V (Harris, Quantitative Chemical Analysis, App. H). It
    // takes up one H+ per electron, as the hydrogen electrode does, so against the RHE in the same
    // solution it reads 1.229 V at every pH (RHE: E(RHE) = E(SHE) + (RT/F) ln10 · pH, DOMAIN
    // conventions; common practice in electrocatalysis).
    for ph in ["0", "3", "7", "14"] {
        let e = table_potential(&["table", "o2/h2o", "--scale", "rhe", "--ph", ph]);
        assert!((e - 1.229).abs() < 0.0006, "pH {ph}: {e}");
        let e = table_potential(&["table", "o2/oh-", "--scale", "rhe", "--ph", ph]);
        assert!((e - 1.229).abs() < 0.0006, "base form, pH {ph}: {e}");
    }
    // A couple without H+ moves by the whole RHE shift: Cu2+/Cu 0.339 V (Harris App. H) at pH 7
    // is 0.339 + 7 × 0.0591593 V vs RHE (slope from the exact SI constants, DOMAIN conventions).
    let e = table_potential(&["table", "cu2+/cu", "--scale", "rhe", "--ph", "7"]);
    assert!((e - (0.339 + 7.0 * 0.0591593)).abs() < 0.0002, "{e}");
}

#[test]
fn ph_line_follows_the_scale() {
    // SCE 0.2412 V vs SHE (Bard & Faulkner 2000, inside back cover); O2/H2O 1.229 V at pH 0
    // (Harris App. H).
    let (status, stdout, stderr) = run(&["ph-line", "o2/h2o", "--scale", "sce", "--to", "1"]);
    assert_eq!(status, 0, "{stderr}");
    let mut lines = stdout.lines();
    assert_eq!(lines.next(), Some("pH,E_V_vs_sce"));
    let first: f64 = lines
        .next()
        .unwrap()
        .split(',')
        .nth(1)
        .unwrap()
        .parse()
        .unwrap();
    assert!((first - (1.229 - 0.2412)).abs() < 0.0005, "{first}");
    // Against the RHE at each row's pH the O2 line is flat (as above).
    let (status, stdout, _) = run(&[
        "ph-line", "o2/h2o", "--scale", "rhe", "--step", "0.1", "--to", "0.3",
    ]);
    assert_eq!(status, 0);
    let rows: Vec<&str> = stdout.lines().skip(1).collect();
    // pH is written as typed steps, not as float sums (0.30000000000000004).
    assert_eq!(
        rows.iter()
            .map(|r| r.split(',').next().unwrap())
            .collect::<Vec<_>>(),
        ["0", "0.1", "0.2", "0.3"]
    );
    for row in rows {
        let e: f64 = row.split(',').nth(1).unwrap().parse().unwrap();
        assert!((e - 1.229).abs() < 0.0006, "{row}");
    }
}

#[test]
fn typed_potentials_are_read_on_the_chosen_scale() {
    // A potential typed with --scale li is vs Li+/Li: a cathode typed at 3.45 V against a lithium
    // anode makes a 3.45 V cell (the anode is the scale's own zero). 3.45 V is the usual figure
    // for LiFePO4 vs Li+/Li (common practice, from memory).
    let cathode = "FePO4 + Li+ + e- -> LiFePO4";
    let cell = json(&[
        "cell",
        "--json",
        "--cathode",
        cathode,
        "--cathode-e0",
        "3.45",
        "--anode",
        "Li+/Li",
        "--scale",
        "li",
    ]);
    assert!(
        (cell["e0_V"].as_f64().unwrap() - 3.45).abs() < 1e-9,
        "{cell}"
    );
    assert!((cell["cathode"]["e0_V"].as_f64().unwrap() - 3.45).abs() < 1e-9);
    let (_, _, stderr) = run(&[
        "cell",
        "--cathode",
        cathode,
        "--cathode-e0",
        "3.45",
        "--anode",
        "Li+/Li",
        "--scale",
        "li",
    ]);
    assert!(stderr.contains("read vs li-li+"), "{stderr}");
    // capacity takes the same scale for its energy (E × Ah/kg).
    let capacity = json(&[
        "capacity",
        "--json",
        "--cathode",
        cathode,
        "--cathode-e0",
        "3.45",
        "--anode",
        "Li+/Li",
        "--scale",
        "li",
    ]);
    let figures = &capacity["cell"];
    assert!(
        (figures["e_V"].as_f64().unwrap() - 3.45).abs() < 1e-9,
        "{figures}"
    );
    let wh = figures["Ah_per_kg"].as_f64().unwrap() * 3.45;
    assert!((figures["Wh_per_kg"].as_f64().unwrap() - wh).abs() < 1e-6 * wh);
}

#[test]
fn temperature_coefficients_follow_the_reference_or_say_they_do_not() {
    // SCE dE/dT −0.661 mV/K (data/reference_electrodes.toml, NBS-derived table): on the SCE scale
    // a couple's dE/dT is its own minus the electrode's.
    let rows = json(&["table", "--json", "zn2+/zn"]);
    let she = rows[0]["dedt_mV_per_K"].as_f64().unwrap();
    let (_, stdout, _) = run(&["table", "zn2+/zn", "--scale", "sce"]);
    let row = stdout.lines().nth(1).unwrap();
    let on_sce: f64 = row.split_whitespace().nth(2).unwrap().parse().unwrap();
    assert!((on_sce - (she + 0.661)).abs() < 0.0006, "{row}");
    assert!(
        stdout.contains("its own published dE/dT subtracted"),
        "{stdout}"
    );
    // Electrodes without a published coefficient, and RHE, keep SHE and say so.
    let (_, stdout, _) = run(&["table", "zn2+/zn", "--scale", "ag-agcl-3m-kcl"]);
    assert!(stdout.contains("still vs SHE"), "{stdout}");
    let (_, stdout, _) = run(&["table", "zn2+/zn", "--scale", "rhe", "--ph", "7"]);
    assert!(stdout.contains("still vs SHE"), "{stdout}");
}

/// A Daniell-type cell discharged from 1 mol of zinc (invented amounts).
const DISCHARGE: &[&str] = &[
    "discharge",
    "--cathode",
    "Cu2+/Cu",
    "--anode",
    "Zn2+/Zn",
    "--amount",
    "Zn=1",
];

const DANIELL: &[&str] = &[
    "cell",
    "--json",
    "--cathode",
    "Cu2+/Cu",
    "--anode",
    "Zn2+/Zn",
];

#[test]
fn temperatures_take_a_unit_and_bare_small_numbers_are_refused() {
    fn with(t: &str) -> Vec<&str> {
        [DANIELL, &["--temperature", t]].concat()
    }
    let kelvin = json(&with("298.15K"));
    for same in ["25C", "25°C", "25 °C", "298.15 K", "298.15"] {
        assert_eq!(json(&with(same)), kelvin, "{same}");
    }
    // 37 °C is 310.15 K (the kelvin is the degree Celsius shifted by 273.15, SI Brochure).
    assert_eq!(
        json(&with("37C"))["temperature_K"],
        json(&with("310.15K"))["temperature_K"]
    );
    let (status, _, stderr) = run(&with("25"));
    assert_eq!(status, 2);
    assert!(stderr.contains("25C"), "{stderr}");
    for bad in ["nan", "inf", "1e308", "-5K", "-300C", "0K"] {
        let (status, _, stderr) = run(&with(bad));
        assert_eq!(status, 2, "{bad}: {stderr}");
        assert!(!stderr.contains("inf V"), "{bad}: {stderr}");
    }
    let (status, _, stderr) = run(&with("400K"));
    assert_eq!(status, 0, "{stderr}");
    assert!(
        stderr.contains("warning: 400 K is outside 0–100 °C"),
        "{stderr}"
    );
}

#[test]
fn non_finite_and_absurd_numbers_are_refused() {
    let typed = [
        "cell",
        "--cathode",
        "Ag+ + e- -> Ag(s)",
        "--anode",
        "Zn2+/Zn",
        "--cathode-e0",
    ];
    for bad in ["nan", "inf", "1e308", "800"] {
        let (status, stdout, stderr) = run(&[&typed[..], &[bad]].concat());
        assert_eq!(status, 2, "{bad}: {stdout}{stderr}");
        assert!(stderr.contains("--cathode-e0"), "{stderr}");
    }
    for bad in ["nan", "1e308", "-40", "99"] {
        let (status, _, stderr) = run(&[DANIELL, &["--ph", bad]].concat());
        assert_eq!(status, 2, "{bad}: {stderr}");
        let (status, _, _) = run(&["ph-line", "o2/h2o", "--to", bad]);
        assert_eq!(status, 2, "{bad}");
    }
    let (status, _, stderr) = run(&[DANIELL, &["--activity", "Cu2+=nan"]].concat());
    assert_eq!(status, 2, "{stderr}");
}

#[test]
fn a_species_named_twice_is_refused_by_name() {
    for extra in [
        &["--activity", "Cu2+=0.1", "--activity", "Cu2+=0.2"][..],
        &["--activity", "Cu2+=0.1", "--molality", "Cu2+=0.1"],
        &[
            "--molality",
            "Zn2+=0.1",
            "--molality",
            "Zn2+=0.1",
            "--molality",
            "Cu2+=0.1",
        ],
    ] {
        let (status, _, stderr) = run(&[DANIELL, extra].concat());
        assert_eq!(status, 2, "{extra:?}");
        assert!(stderr.contains("is given twice"), "{stderr}");
        assert!(
            stderr.contains("Cu2+") || stderr.contains("Zn2+"),
            "{stderr}"
        );
    }
    let (status, _, stderr) = run(&[DISCHARGE, &["--amount", "Zn=10g"]].concat());
    assert_eq!(status, 2);
    assert!(stderr.contains("Zn is given twice"), "{stderr}");
    let (status, _, stderr) = run(&[
        "capacity",
        "Zn2+/Zn",
        "--density",
        "Zn(s)=7.1",
        "--density",
        "Zn(s)=7.2",
    ]);
    assert_eq!(status, 2);
    assert!(stderr.contains("Zn(s) is given twice"), "{stderr}");
}

#[test]
fn discharge_steps_have_a_documented_bound() {
    let (status, _, stderr) = run(&[DISCHARGE, &["--steps", "100000000"]].concat());
    assert_eq!(status, 2);
    assert!(stderr.contains("1 to 10000"), "{stderr}");
}

#[test]
fn a_ph_that_cancels_in_the_cell_is_said_not_refused() {
    // The README example: in O2 + 2 H2 -> 2 H2O the H+ of both halves cancel.
    let (status, stdout, stderr) = run(&[
        "cell",
        "--json",
        "--cathode",
        "O2/H2O",
        "--anode",
        "H+/H2",
        "--pressure",
        "O2=0.21",
        "--pressure",
        "H2=1",
        "--ph",
        "3",
    ]);
    assert_eq!(status, 0, "{stderr}");
    assert!(stderr.contains("pH 3 does not enter Q"), "{stderr}");
    let cell: serde_json::Value = serde_json::from_str(&stdout).unwrap();
    // E = E° − (RT/4F) ln(1/(p(O2)·p(H2)²)), E° 1.229 V (Harris App. H), RT/F 0.0256926 V at
    // 298.15 K (DOMAIN conventions, exact SI constants).
    let expected = 1.229 + 0.0256926 / 4.0 * 0.21f64.ln();
    assert!(
        (cell["e_V"].as_f64().unwrap() - expected).abs() < 0.0005,
        "{cell}"
    );
}
