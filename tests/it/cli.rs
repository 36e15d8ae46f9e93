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
