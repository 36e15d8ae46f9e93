//! The checker's rules: stable codes (`CPL` and three digits, grouped by hundreds), short
//! names, severities and one-line descriptions. Codes are never reused or renumbered.

/// How serious a finding is.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Severity {
    /// The file is wrong: exit status 1.
    Error,
    /// Worth a look; counts as an error only with `--deny-warnings`.
    Warning,
}

impl Severity {
    /// `error` or `warning`.
    pub fn name(self) -> &'static str {
        match self {
            Severity::Error => "error",
            Severity::Warning => "warning",
        }
    }
}

/// A rule of the checker. 1xx: form; 2xx: chemistry; 3xx: numbers; 4xx: the table as a whole.
#[derive(Clone, Copy, Debug, PartialEq, Eq, Hash)]
#[non_exhaustive]
pub enum Rule {
    /// The file is not valid TOML, CSV or UTF-8, or is binary.
    FileSyntax,
    /// A known key holds a value of the wrong type.
    WrongType,
    /// A couple has no `reaction`.
    MissingReaction,
    /// The reaction text does not follow the notation.
    Notation,
    /// A key the format does not know.
    UnknownKey,
    /// The file is larger than the checker reads.
    FileTooLarge,
    /// Atoms of some element are not conserved.
    AtomsNotConserved,
    /// The charge is not conserved.
    ChargeNotConserved,
    /// Electrons on the right: an oxidation, where a reduction is tabulated.
    NotAReduction,
    /// No electrons: not a half-reaction.
    NoElectrons,
    /// The electrons differ from the oxidation-number change.
    ElectronsVsOxidation,
    /// H+ in a base entry, OH- in an acid entry, or either in a neutral one.
    MediumMismatch,
    /// `medium` is not `acid`, `base` or `neutral`.
    UnknownMedium,
    /// A couple has no `e0`.
    MissingE0,
    /// `e0` or `dedt` is NaN or infinite.
    NotFinite,
    /// `e0` outside the plausible range.
    E0OutOfRange,
    /// A value with a unit in it, or that looks like it is in another unit.
    MixedUnits,
    /// `dedt` outside the plausible range.
    DedtOutOfRange,
    /// Two couples share an `id`.
    DuplicateId,
    /// The same couple twice with potentials that differ beyond the tolerance.
    ConflictingPotentials,
    /// Free energies that do not add up: a cycle of three couples, or the acid and base forms
    /// of one couple through pKw, beyond the threshold.
    AdditivityViolated,
    /// A couple without `source`.
    MissingSource,
    /// `e0` differs from the E° that formation data give beyond the threshold.
    E0VsFormationData,
    /// A couple marked `verified = false`, when the checker is told to refuse them.
    UnverifiedValue,
    /// The additivity check stopped at its limit of pairs before comparing every pair.
    AdditivityCutShort,
}

impl Rule {
    /// Every rule, in code order.
    pub const ALL: [Rule; 25] = [
        Rule::FileSyntax,
        Rule::WrongType,
        Rule::MissingReaction,
        Rule::Notation,
        Rule::UnknownKey,
        Rule::FileTooLarge,
        Rule::AtomsNotConserved,
        Rule::ChargeNotConserved,
        Rule::NotAReduction,
        Rule::NoElectrons,
        Rule::ElectronsVsOxidation,
        Rule::MediumMismatch,
        Rule::UnknownMedium,
        Rule::MissingE0,
        Rule::NotFinite,
        Rule::E0OutOfRange,
        Rule::MixedUnits,
        Rule::DedtOutOfRange,
        Rule::DuplicateId,
        Rule::ConflictingPotentials,
        Rule::AdditivityViolated,
        Rule::MissingSource,
        Rule::E0VsFormationData,
        Rule::UnverifiedValue,
        Rule::AdditivityCutShort,
    ];

    /// The stable code, e.g. `CPL201`.
    pub fn code(self) -> &'static str {
        self.info().0
    }

    /// A short kebab-case name, e.g. `atoms-not-conserved`.
    pub fn name(self) -> &'static str {
        self.info().1
    }

    /// Severity of every finding of this rule.
    pub fn severity(self) -> Severity {
        self.info().2
    }

    /// One line saying what the rule checks.
    pub fn description(self) -> &'static str {
        self.info().3
    }

    fn info(self) -> (&'static str, &'static str, Severity, &'static str) {
        use Severity::{Error, Warning};
        match self {
            Rule::FileSyntax => (
                "CPL101",
                "file-syntax",
                Error,
                "the file is valid UTF-8 text and valid TOML or CSV",
            ),
            Rule::WrongType => (
                "CPL102",
                "wrong-type",
                Error,
                "each known key holds a value of its type (text or number)",
            ),
            Rule::MissingReaction => (
                "CPL103",
                "missing-reaction",
                Error,
                "every couple has a reaction",
            ),
            Rule::Notation => (
                "CPL104",
                "notation",
                Error,
                "the reaction follows couplet notation",
            ),
            Rule::UnknownKey => (
                "CPL105",
                "unknown-key",
                Warning,
                "only documented keys are used (a misspelt key is silently ignored otherwise)",
            ),
            Rule::FileTooLarge => (
                "CPL106",
                "file-too-large",
                Error,
                "the file is no larger than the checker reads",
            ),
            Rule::AtomsNotConserved => (
                "CPL201",
                "atoms-not-conserved",
                Error,
                "every element has as many atoms on the left as on the right",
            ),
            Rule::ChargeNotConserved => (
                "CPL202",
                "charge-not-conserved",
                Error,
                "the charge on the left equals the charge on the right",
            ),
            Rule::NotAReduction => (
                "CPL203",
                "not-a-reduction",
                Error,
                "the half-reaction is written as a reduction, electrons on the left",
            ),
            Rule::NoElectrons => (
                "CPL204",
                "no-electrons",
                Error,
                "the reaction is a half-reaction: it has electrons",
            ),
            Rule::ElectronsVsOxidation => (
                "CPL205",
                "electrons-vs-oxidation",
                Error,
                "the electrons equal the change in oxidation numbers",
            ),
            Rule::MediumMismatch => (
                "CPL206",
                "medium-mismatch",
                Error,
                "the species fit the medium: no OH- in acid, no H+ in base, neither in neutral",
            ),
            Rule::UnknownMedium => (
                "CPL207",
                "unknown-medium",
                Error,
                "medium is acid, base or neutral",
            ),
            Rule::MissingE0 => ("CPL301", "missing-e0", Error, "every couple has e0"),
            Rule::NotFinite => (
                "CPL302",
                "not-finite",
                Error,
                "e0 and dedt are finite numbers",
            ),
            Rule::E0OutOfRange => (
                "CPL303",
                "e0-out-of-range",
                Error,
                "e0 lies within -3.5 V to +3.5 V vs SHE",
            ),
            Rule::MixedUnits => (
                "CPL304",
                "mixed-units",
                Error,
                "e0 is a bare number in volts and dedt a bare number in mV/K",
            ),
            Rule::DedtOutOfRange => (
                "CPL305",
                "dedt-out-of-range",
                Error,
                "dedt lies within -5 mV/K to +5 mV/K",
            ),
            Rule::DuplicateId => (
                "CPL401",
                "duplicate-id",
                Error,
                "every id is used once across all files checked",
            ),
            Rule::ConflictingPotentials => (
                "CPL402",
                "conflicting-potentials",
                Error,
                "a couple written twice has the same e0 within the tolerance",
            ),
            Rule::AdditivityViolated => (
                "CPL403",
                "additivity-violated",
                Warning,
                "free energies add up: three couples of a cycle obey n1 E1 + n2 E2 = n3 E3, and a couple's acid and base forms agree through pKw, within the threshold (10 mV by default) on the couple the cycle pins most tightly",
            ),
            Rule::MissingSource => (
                "CPL404",
                "missing-source",
                Warning,
                "every couple names the publication its value was read in",
            ),
            Rule::E0VsFormationData => (
                "CPL306",
                "e0-vs-formation-data",
                Warning,
                "e0 agrees with the E° computed from formation data (−ΔrG°/nF) within the threshold, where every species has data",
            ),
            Rule::UnverifiedValue => (
                "CPL307",
                "unverified-value",
                Error,
                "with --refuse-unverified: no couple is marked verified = false (a value no read source confirms)",
            ),
            Rule::AdditivityCutShort => (
                "CPL405",
                "additivity-cut-short",
                Warning,
                "the additivity check compared every pair of linked couples (it stops at a documented number of pairs so that a check stays bounded)",
            ),
        }
    }
}
