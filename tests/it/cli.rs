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

/// Asserts that couplet refuses `args` with `status` and a message on standard error holding
/// `reason`.
fn refused(args: &[&str], status: i32, reason: &str) {
    let (code, stdout, stderr) = run(args);
    assert_eq!(code, status, "{args:?}: {stdout}{stderr}");
    assert!(stderr.contains(reason), "{args:?}: {stderr}");
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
    // ph-line sweeps the pH itself: a --ph would be ignored, so it is refused.
    refused(&["ph-line", "o2/h2o", "--ph", "3"], 2, "leave out --ph");
    refused(&["table", "o2/h2o", "--ph", "3"], 2, "only by --scale rhe");
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
        // With --json the error is a JSON object on standard output.
        let (status, stdout, _) = run(&[DANIELL, extra].concat());
        assert_eq!(status, 2, "{extra:?}");
        let error: serde_json::Value = serde_json::from_str(&stdout).unwrap();
        assert_eq!(error["error"]["kind"], "usage");
        let message = error["error"]["message"].as_str().unwrap();
        assert!(message.contains("is given twice"), "{message}");
        assert!(
            message.contains("Cu2+") || message.contains("Zn2+"),
            "{message}"
        );
    }
    refused(
        &[DISCHARGE, &["--amount", "Zn=10g"]].concat(),
        2,
        "Zn is given twice",
    );
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
    refused(
        &[DISCHARGE, &["--steps", "100000000"]].concat(),
        2,
        "1 to 10000",
    );
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

#[test]
fn exact_numbers_are_integers_when_whole_and_fractions_otherwise_in_every_json() {
    let balance = json(&[
        "balance",
        "--json",
        "--medium",
        "acid",
        "MnO4- + Fe2+ -> Mn2+ + Fe3+",
    ]);
    // MnO4- + 5 Fe2+ + 8 H+ -> Mn2+ + 5 Fe3+ + 4 H2O (any general-chemistry text).
    assert_eq!(balance["reactants"][1]["coefficient"], 5);
    let cell = json(&[
        "cell",
        "--json",
        "--cathode",
        "Fe3+/Fe2+",
        "--anode",
        "Zn2+/Zn",
    ]);
    // 2 Fe3+ + Zn -> 2 Fe2+ + Zn2+, n = 2.
    assert_eq!(cell["net"]["reactants"][0]["coefficient"], 2);
    assert_eq!(cell["n"], 2);
    assert_eq!(cell["cathode"]["n"], 1);
    let parse = json(&["parse", "--json", "1/2 O2 + H2 -> H2O"]);
    assert_eq!(parse["reactants"][0]["coefficient"], "1/2");
    assert_eq!(parse["reactants"][1]["coefficient"], 1);
    let capacity = json(&["capacity", "--json", "Zn2+/Zn"]);
    assert_eq!(capacity["materials"][0]["n"], 2);
    let derive = json(&["derive", "--json", "Fe3+/Fe2+", "Fe2+/Fe"]);
    assert_eq!(derive["n"], 3);
}

#[test]
fn cautions_reach_the_json_wherever_the_text_has_them() {
    // Dichromate is chromium(VI), a carcinogen (IARC group 1); lead is toxic.
    let balance = json(&[
        "balance",
        "--json",
        "--medium",
        "acid",
        "Cr2O7^2- + I- -> Cr3+ + I2",
    ]);
    assert!(
        balance["caution"]
            .as_str()
            .unwrap()
            .contains("chromium(VI)"),
        "{balance}"
    );
    let water = json(&["balance", "--json", "H2O -> H2 + O2"]);
    assert!(
        water["caution"].as_str().unwrap().contains("hydrogen"),
        "{water}"
    );
    let none = json(&["balance", "--json", "NaCl -> Na+ + Cl-"]);
    assert!(none["caution"].is_null(), "{none}");
    let lead = ["--cathode", "PbO2/PbSO4", "--anode", "PbSO4/Pb"];
    let capacity = json(&[&["capacity", "--json"][..], &lead].concat());
    assert!(
        capacity["caution"].as_str().unwrap().contains("lead"),
        "{capacity}"
    );
    let amounts = [
        "--amount", "Pb=1", "--amount", "PbO2=1", "--amount", "H2SO4=3",
    ];
    let discharge = json(
        &[
            &["discharge", "--json", "--solvent-kg", "1"][..],
            &lead,
            &amounts,
        ]
        .concat(),
    );
    assert!(
        discharge["caution"].as_str().unwrap().contains("lead"),
        "{discharge}"
    );
}

#[test]
fn the_same_bad_input_gets_the_same_kind_and_status_everywhere() {
    // (typed half-reaction, kind, status): an unknown element is a fault of typing (2); a
    // charge beyond the protons of the formula is read but impossible (1).
    for (half, kind, status) in [
        ("Xx2+ + 2 e- -> Xx", "unknown_element", 2),
        ("H^2+ + 2 e- -> H2", "chemistry", 1),
    ] {
        let cell = [
            "--cathode",
            half,
            "--cathode-e0",
            "0.1",
            "--anode",
            "Zn2+/Zn",
        ];
        let mut seen = Vec::new();
        for args in [
            vec!["parse", "--json", half],
            vec!["balance", "--json", half],
            vec!["capacity", "--json", half],
            [&["cell", "--json"][..], &cell].concat(),
            [&["discharge", "--json", "--amount", "Zn=1"][..], &cell].concat(),
        ] {
            let (code, stdout, stderr) = run(&args);
            let value: serde_json::Value = serde_json::from_str(&stdout)
                .unwrap_or_else(|e| panic!("{args:?}: {e}: {stdout}{stderr}"));
            seen.push((args[0], value["error"]["kind"].clone(), code));
        }
        for (command, seen_kind, code) in &seen {
            assert_eq!(
                (seen_kind.as_str(), *code),
                (Some(kind), status),
                "{command}: {seen:?}"
            );
        }
    }
}

#[test]
fn a_typed_half_reaction_that_does_not_balance_has_no_capacity() {
    refused(&["capacity", "Cu2+ + e- -> Cu"], 1, "does not balance");
}

#[test]
fn people_read_rounded_figures() {
    // 1.3 mol/kg H2SO4 has I = 3 × 1.3 = 3.9 mol/kg (I = ½ Σ m z², full dissociation), beyond
    // the Davies range: the error says 3.9, not 3.9000000000000004.
    let lead = ["cell", "--cathode", "PbO2/PbSO4", "--anode", "PbSO4/Pb"];
    let davies = ["--molality", "H2SO4=1.3", "--gamma", "davies"];
    refused(
        &[&lead[..], &davies].concat(),
        2,
        "ionic strength 3.9 mol/kg",
    );
    let long_decimals = |text: &str| {
        text.split(|c: char| !(c.is_ascii_digit() || c == '.'))
            .any(|number| number.split_once('.').is_some_and(|(_, d)| d.len() >= 10))
    };
    for args in EVERY_COMMAND
        .iter()
        .filter(|a| !a.contains(&"--json") && a[0] != "check")
    {
        let (_, stdout, stderr) = run(args);
        assert!(!long_decimals(&stdout), "{args:?}: {stdout}");
        assert!(!long_decimals(&stderr), "{args:?}: {stderr}");
    }
}

#[test]
fn a_discharge_curve_that_stops_early_says_what_its_energy_covers() {
    // Invented amounts: the copper runs out, and its activity reaches zero one step before the end.
    let amounts = [
        "--amount",
        "Cu2+=0.05",
        "--amount",
        "Zn2+=0.01",
        "--solvent-kg",
        "1",
    ];
    let args = [DISCHARGE, &amounts].concat();
    let (status, stdout, _) = run(&args);
    assert_eq!(status, 0);
    assert!(stdout.contains("cover the computed curve only"), "{stdout}");
    let curve = json(&[&args[..], &["--json"]].concat());
    assert!(!curve["stopped"].is_null());
    let covered = curve["energy_charge_Ah"].as_f64().unwrap();
    assert!(covered < curve["capacity_Ah"].as_f64().unwrap(), "{curve}");
}

#[test]
fn a_full_standard_error_is_no_panic() {
    let full = || {
        std::fs::OpenOptions::new()
            .write(true)
            .open("/dev/full")
            .expect("/dev/full exists on Linux")
    };
    // Notes, warnings and errors all go to standard error.
    for args in [
        &[
            "cell",
            "--cathode",
            "Cu2+/Cu",
            "--anode",
            "Zn2+/Zn",
            "--temperature",
            "400K",
        ][..],
        &["balance", "H2 -> H2O"],
        &["parse", "Xx"],
        &["ph-line", "o2/h2o"],
    ] {
        let output = couplet().args(args).stderr(full()).output().unwrap();
        assert_ne!(output.status.code(), Some(101), "{args:?}");
    }
}

#[test]
fn scale_footers_say_what_the_columns_are() {
    // The layout people read; the numbers are checked by the tests above.
    let (_, rhe, _) = run(&["table", "o2/h2o", "--scale", "rhe", "--ph", "7"]);
    let (_, sce, _) = run(&["table", "zn2+/zn", "--scale", "sce"]);
    insta::assert_snapshot!("table_scale_footers", format!("{rhe}\n{sce}"));
}

#[test]
fn json_errors_have_one_shape() {
    let (status, stdout, _) = run(&["table", "--json", "--element", "Xy"]);
    assert_eq!(status, 2);
    insta::assert_snapshot!("json_usage_error", stdout);
}

/// The words of a README command line as a POSIX shell splits them (single quotes only, which
/// is all the README uses), up to a `#` comment or a `>` redirection.
fn shell_words(line: &str) -> Vec<String> {
    let mut words = Vec::new();
    let mut word: Option<String> = None;
    let mut quoted = false;
    for c in line.chars() {
        match c {
            '\'' => {
                quoted = !quoted;
                word.get_or_insert_with(String::new);
            }
            ' ' if !quoted => words.extend(word.take()),
            '#' | '>' if !quoted && word.is_none() => break,
            _ => word.get_or_insert_with(String::new).push(c),
        }
    }
    words.extend(word);
    words
}

#[test]
fn the_readme_examples_run() {
    let readme = std::fs::read_to_string("README.md").unwrap();
    // Examples that write files (--csv, --svg) write them here.
    let dir = tempfile::tempdir().unwrap();
    let mut in_code = false;
    let mut ran = 0;
    let mut pending = String::new();
    for line in readme.lines() {
        if line.starts_with("```") {
            in_code = !in_code;
            continue;
        }
        if !in_code {
            continue;
        }
        if let Some(start) = line.strip_suffix('\\') {
            pending.push_str(start);
            continue;
        }
        let line = std::mem::take(&mut pending) + line;
        // Synopses ([--option]) and `check` (which reads and may rewrite directories) are left
        // out; the checker's own tests run it.
        let Some(rest) = line.strip_prefix("couplet ") else {
            continue;
        };
        if line.contains('[') || rest.starts_with("check") {
            continue;
        }
        let output = couplet()
            .args(shell_words(rest))
            .current_dir(dir.path())
            .output()
            .unwrap();
        let stderr = String::from_utf8_lossy(&output.stderr);
        assert_eq!(output.status.code(), Some(0), "README: {line}\n{stderr}");
        ran += 1;
    }
    assert!(ran >= 25, "only {ran} README examples found");
}

#[test]
fn standard_input_is_read_with_a_bound() {
    // A stream larger than the 32 MiB couplet reads from a file is refused, not held whole.
    let output = assert_cmd::Command::new(assert_cmd::cargo::cargo_bin!("couplet"))
        .args(["balance", "-"])
        .write_stdin(vec![b'H'; 33 * 1024 * 1024])
        .output()
        .unwrap();
    assert_eq!(output.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&output.stderr).contains("larger than 32 MiB"));
    let output = assert_cmd::Command::new(assert_cmd::cargo::cargo_bin!("couplet"))
        .args(["parse", "-"])
        .write_stdin(vec![0xff, 0xfe])
        .output()
        .unwrap();
    assert_eq!(output.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&output.stderr).contains("not UTF-8"));
}

/// A mixed batch: whole redox reactions, half-reactions, repeats (cached species met again),
/// states that tell species apart, fractional oxidation numbers, a non-unique, an impossible,
/// a syntax error, an unknown element, a comment and a blank line. Invented as test input.
const MIXED_BATCH: &str = "MnO4- + Fe2+ -> Mn2+ + Fe3+
# a comment line
Cr2O7^2- + Fe2+ -> Cr3+ + Fe3+

MnO4- -> Mn2+
Fe3O4 + H2 -> Fe + H2O
H2O(l) -> H2(g) + O2(g)
H2O -> H2 + O2
H2 + O2 -> H2O + H2O2
Cu + H2 -> Zn
MnO4- + -> Mn2+
Qq2 -> Qq
K2Cr2O7 + KBr + H2SO4 -> Cr2(SO4)3 + Br2 + K2SO4 + H2O
MnO4- + Fe2+ -> Mn2+ + Fe3+
Cl2 -> Cl- + ClO3-
";

#[test]
fn a_batch_writes_what_each_equation_alone_writes() {
    let output = assert_cmd::Command::new(assert_cmd::cargo::cargo_bin!("couplet"))
        .args(["balance", "--json", "--medium", "acid", "-"])
        .write_stdin(MIXED_BATCH)
        .output()
        .unwrap();
    // Some lines cannot be balanced: findings, exit 1.
    assert_eq!(output.status.code(), Some(1));
    let batch = String::from_utf8(output.stdout).unwrap();
    let mut objects = batch.lines();
    let mut compared = 0;
    for (index, line) in MIXED_BATCH.lines().enumerate() {
        if line.is_empty() || line.starts_with('#') {
            continue;
        }
        let mut from_batch: serde_json::Value =
            serde_json::from_str(objects.next().expect("one object per equation")).unwrap();
        let (_, alone, _) = run(&["balance", "--json", "--medium", "acid", line]);
        let alone: serde_json::Value = serde_json::from_str(&alone).unwrap();
        if from_batch.get("error").is_some() {
            // Only the batch says which line failed.
            let number = from_batch.as_object_mut().unwrap().remove("line");
            assert_eq!(number, Some(serde_json::json!(index + 1)), "{line}");
        }
        assert_eq!(from_batch, alone, "{line}");
        compared += 1;
    }
    assert_eq!(objects.next(), None);
    assert_eq!(compared, 13);
    // Permanganate takes five electrons per Mn (+7 → +2) from five Fe2+ (common practice,
    // any general-chemistry text): the first and the repeated line say so alike.
    let first: serde_json::Value = serde_json::from_str(batch.lines().next().unwrap()).unwrap();
    assert_eq!(first["electrons"], 5);
    assert_eq!(batch.lines().next(), batch.lines().nth(11));
}

#[test]
fn the_library_batch_equals_fresh_writers_per_equation() {
    use couplet::balance::{BalanceOptions, Medium, balance_text};
    use couplet::export::balance_json::{BalanceJson, balance_lines_json};
    for medium in [Medium::None, Medium::Acid, Medium::Base] {
        let options = BalanceOptions {
            medium,
            ..BalanceOptions::default()
        };
        let mut batch = Vec::new();
        let all_balanced = balance_lines_json(MIXED_BATCH, &options, &mut batch).unwrap();
        assert!(!all_balanced);
        let mut one_by_one = Vec::new();
        for (index, line) in MIXED_BATCH.lines().enumerate() {
            if line.is_empty() || line.starts_with('#') {
                continue;
            }
            // A new writer each time: nothing kept from earlier equations.
            let result = balance_text(line, &options);
            BalanceJson::new().write(&mut one_by_one, line, Some(index + 1), medium, &result);
        }
        assert_eq!(
            String::from_utf8(batch).unwrap(),
            String::from_utf8(one_by_one).unwrap()
        );
    }
}
