//! The data-file checker: findings about couple files (form, chemistry, numbers, and the
//! consistency of every file given together), each with a stable rule code of the project's
//! own, a severity, a one-line reason, a location and, where the engine knows one, a suggestion.
//!
//! Data flows one way: files are read by the one couple-file reader
//! ([`crate::table::record`]), each entry is judged on its own ([`entry`]), then all entries of
//! all files together ([`consistency`]). Renderers ([`output`]) and the rewriter ([`fix`]) only
//! use the [`Report`]; the checker never writes a file.
//!
//! ```
//! use couplet::check::{CheckOptions, SourceFile, check};
//! use couplet::table::{CoupleFile, FileFormat};
//!
//! // Invented entry: the oxygen count is off.
//! let text = "[[couple]]\nreaction = \"MnO4- + 8 H+ + 5 e- -> Mn2+ + 3 H2O(l)\"\ne0 = 1.51\nsource = \"our test\"\n";
//! let file = SourceFile::new("t.toml", CoupleFile::from_text(text, FileFormat::Toml));
//! let report = check(vec![file], &CheckOptions::default());
//! assert_eq!(report.findings[0].rule.code(), "CPL201");
//! assert_eq!(report.findings[0].suggestion.as_deref(), Some("MnO4- + 8 H+ + 5 e- -> Mn2+ + 4 H2O(l)"));
//! ```

pub mod consistency;
pub mod entry;
pub mod fix;
pub mod formation;
pub mod load;
pub mod output;
pub mod pieces;
mod rules;
pub mod verification;

pub use load::{DEFAULT_CHECK_FILE_BYTES, LoadError, LoadOptions, MAX_FILE_BYTES, load_file};
pub use rules::{Rule, Severity};

use crate::notation::Span;
use crate::reaction::Reaction;
use crate::table::{CoupleFile, CoupleRecord, FileFormat};
use num_rational::BigRational;
use pieces::Pieces;

/// The electrons that the oxidation-number change of a balanced half-reaction accounts for
/// (the sum over elements of Δ(oxidation number) × atoms, as a positive number), or `None`
/// when it cannot be told. Supplied by the oxidation-number module.
pub type OxidationNumberChange = fn(&Reaction) -> Option<BigRational>;

/// Default tolerance between potentials that should agree, in volts.
pub const DEFAULT_TOLERANCE_VOLTS: f64 = 0.01;

/// How to check.
#[derive(Clone, Copy, Debug)]
pub struct CheckOptions {
    /// How far two potentials of the same couple may differ (rule CPL402), in volts.
    pub tolerance_volts: f64,
    /// Rule CPL403: how far a couple's e0 may be from what free-energy addition with the other
    /// couples of a cycle (or its acid or base form through pKw) gives, in volts (default
    /// [`consistency::DEFAULT_ADDITIVITY_THRESHOLD_VOLTS`], 10 mV).
    pub additivity_threshold_volts: f64,
    /// The oxidation-number change of a half-reaction (by default from
    /// [`crate::oxidation`]): rule [`Rule::ElectronsVsOxidation`] compares the written
    /// electrons with it. `None` turns that rule off.
    pub oxidation_number_change: Option<OxidationNumberChange>,
    /// Rule [`Rule::E0VsFormationData`]: the formation data and the threshold; `None` turns
    /// the rule off.
    pub formation: Option<formation::FormationCheck>,
    /// Rule [`Rule::UnverifiedValue`]: refuse couples marked `verified = false`.
    pub refuse_unverified: bool,
    /// Units of balancing work (see [`crate::balance`], work limit) the whole check may spend
    /// on suggestions for faulty reactions. Once spent, findings say that no suggestion was
    /// worked out. The checks themselves are linear in the file and need no budget.
    pub work_limit: u64,
    /// Units one reaction's suggestion may use (by default the balancer's own
    /// [`crate::balance::DEFAULT_WORK_LIMIT`]); past it the finding says so.
    pub reaction_work_limit: u64,
    /// Most pairs of linked couples the additivity check (CPL403) compares; past it the check
    /// stops with a CPL405 warning. Pairs grow with the square of the couples sharing a
    /// species, so without a bound a large table could keep a CI job busy for minutes.
    pub additivity_pair_limit: usize,
}

/// The default [`CheckOptions::additivity_pair_limit`]: two million pairs, a few seconds.
pub const DEFAULT_ADDITIVITY_PAIRS: usize = 2_000_000;

/// The default [`CheckOptions::work_limit`]: ten reactions at the balancer's own limit, about
/// 1.5 s on the project's build machine however hostile the files are.
pub const DEFAULT_CHECK_WORK_LIMIT: u64 = 10 * crate::balance::DEFAULT_WORK_LIMIT;

/// What is left of a check's balancing budget, shared by the threads that judge entries.
/// Which entries get a suggestion depends on the thread split only once the budget runs out.
#[derive(Debug)]
pub struct WorkBudget(std::sync::atomic::AtomicU64);

impl WorkBudget {
    /// A budget of `units`.
    pub fn new(units: u64) -> WorkBudget {
        WorkBudget(std::sync::atomic::AtomicU64::new(units))
    }

    /// Takes up to `wanted` units; returns how many were granted (0 when spent).
    pub fn take(&self, wanted: u64) -> u64 {
        use std::sync::atomic::Ordering::Relaxed;
        let previous = self
            .0
            .fetch_update(Relaxed, Relaxed, |left| Some(left.saturating_sub(wanted)))
            .unwrap_or(0);
        previous.min(wanted)
    }

    /// Returns units taken but not used.
    pub fn give_back(&self, units: u64) {
        self.0
            .fetch_add(units, std::sync::atomic::Ordering::Relaxed);
    }
}

impl Default for CheckOptions {
    fn default() -> CheckOptions {
        CheckOptions {
            tolerance_volts: DEFAULT_TOLERANCE_VOLTS,
            additivity_threshold_volts: consistency::DEFAULT_ADDITIVITY_THRESHOLD_VOLTS,
            oxidation_number_change: Some(crate::oxidation::oxidation_number_electrons),
            formation: Some(formation::FormationCheck::default()),
            refuse_unverified: false,
            work_limit: DEFAULT_CHECK_WORK_LIMIT,
            reaction_work_limit: crate::balance::DEFAULT_WORK_LIMIT,
            additivity_pair_limit: DEFAULT_ADDITIVITY_PAIRS,
        }
    }
}

/// A file to check: the name to show for it and what the reader made of it.
#[derive(Clone, Debug)]
pub struct SourceFile {
    /// The path as the user gave it (or as found under a directory they gave).
    pub name: String,
    /// The text, and the records and problems of form. A file read in pieces
    /// ([`SourceFile::in_pieces`]) has its text here but no records: they are read a piece at
    /// a time while it is checked, and not kept.
    pub file: CoupleFile,
    /// A problem found before the text could be read (too large, binary): reported as a
    /// finding, and the file has no records.
    pub load_finding: Option<(Rule, String)>,
    /// Where the file is cut when it is read in pieces.
    pieces: Option<Pieces>,
    /// Byte offsets where lines start, made on first use: locating thousands of findings by
    /// rescanning the text each time would be quadratic. Kept as u32 below 4 GiB (a million
    /// couples are about seven million lines).
    line_starts: std::sync::OnceLock<LineStarts>,
}

impl SourceFile {
    /// A file read from text or bytes.
    pub fn new(name: impl Into<String>, file: CoupleFile) -> SourceFile {
        SourceFile {
            name: name.into(),
            file,
            load_finding: None,
            pieces: None,
            line_starts: std::sync::OnceLock::new(),
        }
    }

    /// A file whose couples are read a few thousand at a time while it is checked
    /// ([`pieces`]), so that its records are never all in memory. When the text cannot be cut
    /// safely between couples, the text comes back with the reason.
    pub fn in_pieces(
        name: impl Into<String>,
        text: String,
        format: FileFormat,
    ) -> Result<SourceFile, (String, pieces::Uncuttable)> {
        let pieces = match Pieces::cut(&text, format) {
            Ok(pieces) => pieces,
            Err(why) => return Err((text, why)),
        };
        let file = CoupleFile {
            format,
            text,
            records: Vec::new(),
            problems: Vec::new(),
            unknown_keys: Vec::new(),
        };
        Ok(SourceFile {
            pieces: Some(pieces),
            ..SourceFile::new(name, file)
        })
    }

    /// A file that could not be read as text, with the finding that says why.
    pub fn unread(
        name: impl Into<String>,
        format: FileFormat,
        rule: Rule,
        message: String,
    ) -> SourceFile {
        SourceFile {
            load_finding: Some((rule, message)),
            ..SourceFile::new(name, CoupleFile::from_text("", format))
        }
    }

    /// How many couples the file holds (its records, or the couples of its pieces).
    pub fn couples(&self) -> usize {
        self.pieces
            .as_ref()
            .map_or(self.file.records.len(), Pieces::couples)
    }

    /// Whether the file is read in pieces (its records are not kept).
    pub fn is_in_pieces(&self) -> bool {
        self.pieces.is_some()
    }

    /// Calls `each` with every record of the file in order: the kept records, or each piece's
    /// records read again from the text.
    pub fn for_each_record(&self, mut each: impl FnMut(&CoupleRecord)) {
        match &self.pieces {
            None => self.file.records.iter().for_each(each),
            Some(pieces) => {
                for index in 0..pieces.len() {
                    let part = pieces.read(
                        &self.file.text,
                        self.file.format,
                        index,
                        pieces.first(index),
                    );
                    part.records.iter().for_each(&mut each);
                }
            }
        }
    }

    /// 1-based line and column (in characters) of a byte offset.
    pub fn line_column(&self, offset: usize) -> (usize, usize) {
        let text = &self.file.text;
        let starts = self.line_starts.get_or_init(|| {
            let starts = std::iter::once(0).chain(text.match_indices('\n').map(|(i, _)| i + 1));
            match starts.clone().map(u32::try_from).collect() {
                Ok(small) => LineStarts::Small(small),
                Err(_) => LineStarts::Large(starts.collect()),
            }
        });
        let mut offset = offset.min(text.len());
        while !text.is_char_boundary(offset) {
            offset -= 1;
        }
        let (line, line_start) = match starts {
            LineStarts::Small(starts) => {
                let line = starts.partition_point(|&start| start as usize <= offset);
                (line, starts[line - 1] as usize)
            }
            LineStarts::Large(starts) => {
                let line = starts.partition_point(|&start| start <= offset);
                (line, starts[line - 1])
            }
        };
        (line, text[line_start..offset].chars().count() + 1)
    }
}

/// Line starts of a file's text.
#[derive(Clone, Debug)]
enum LineStarts {
    Small(Vec<u32>),
    Large(Vec<usize>),
}

/// A rewrite the engine is sure of: the new text of one entry's `reaction`.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct Fix {
    /// The couple (index among the file's couples).
    pub record: usize,
    /// Where its `reaction` value is written (quotes included).
    pub span: Span,
    /// The balanced reaction text to write.
    pub reaction: String,
}

/// One finding.
#[derive(Clone, Debug)]
pub struct Finding {
    /// Which rule.
    pub rule: Rule,
    /// The file (index into [`Report::files`]).
    pub file: usize,
    /// Where in the file.
    pub span: Span,
    /// One line, lower-case, no trailing period.
    pub message: String,
    /// What to write instead, when the checker knows.
    pub suggestion: Option<String>,
    /// A rewrite `--fix` may apply.
    pub fix: Option<Fix>,
}

impl Finding {
    /// The rule's severity.
    pub fn severity(&self) -> Severity {
        self.rule.severity()
    }
}

/// Counts for the summary line.
#[derive(Clone, Copy, Debug, PartialEq, Eq, serde::Serialize)]
pub struct Summary {
    /// Files checked.
    pub files: usize,
    /// Couples read.
    pub entries: usize,
    /// Findings of severity error.
    pub errors: usize,
    /// Findings of severity warning.
    pub warnings: usize,
}

/// Everything found in a set of files.
#[derive(Clone, Debug)]
pub struct Report {
    /// The files, in the order given.
    pub files: Vec<SourceFile>,
    /// The findings, by file and then by position.
    pub findings: Vec<Finding>,
}

impl Report {
    /// Counts of files, entries, errors and warnings.
    pub fn summary(&self) -> Summary {
        let count = |severity| {
            self.findings
                .iter()
                .filter(|f| f.severity() == severity)
                .count()
        };
        Summary {
            files: self.files.len(),
            entries: self.files.iter().map(SourceFile::couples).sum(),
            errors: count(Severity::Error),
            warnings: count(Severity::Warning),
        }
    }

    /// 1-based line and column (in characters) where a finding starts.
    pub fn line_column(&self, finding: &Finding) -> (usize, usize) {
        self.files[finding.file].line_column(finding.span.start)
    }

    /// The fixes for one file, in record order.
    pub fn fixes_for(&self, file: usize) -> Vec<&Fix> {
        let mut fixes: Vec<&Fix> = self
            .findings
            .iter()
            .filter(|f| f.file == file)
            .filter_map(|f| f.fix.as_ref())
            .collect();
        fixes.sort_by_key(|f| f.record);
        fixes.dedup_by_key(|f| f.record);
        fixes
    }
}

/// Checks every file on its own, then all of them together.
///
/// Entries are judged in batches (a file's records, or a few pieces of a file read in pieces,
/// on the available cores); what the table-wide checks need of each is handed to them at once,
/// so only the findings, the ids and one compact form per distinct couple stay in memory.
pub fn check(files: Vec<SourceFile>, options: &CheckOptions) -> Report {
    let mut findings = Vec::new();
    let budget = WorkBudget::new(options.work_limit);
    let mut table = consistency::TableChecker::new(options);
    for (index, source) in files.iter().enumerate() {
        if let Some((rule, message)) = &source.load_finding {
            findings.push(Finding {
                rule: *rule,
                file: index,
                span: Span::new(0, 0),
                message: message.clone(),
                suggestion: None,
                fix: None,
            });
            continue;
        }
        let Some(pieces) = &source.pieces else {
            findings.extend(entry::check_form(index, &source.file.text, &source.file));
            let (file_findings, entries) =
                entry::check_records(index, &source.file.records, options, &budget);
            findings.extend(file_findings);
            entries.into_iter().for_each(|e| table.add(e));
            continue;
        };
        let threads = std::thread::available_parallelism().map_or(1, |n| n.get().min(8));
        let (text, format) = (&source.file.text, source.file.format);
        let budget = &budget;
        let judge_piece = |piece: usize| {
            let part = pieces.read(text, format, piece, pieces.first(piece));
            let mut piece_findings = entry::check_form(index, text, &part);
            let (record_findings, entries) =
                entry::judge_records(index, &part.records, options, budget);
            piece_findings.extend(record_findings);
            (piece_findings, entries)
        };
        // Workers take pieces in turn; this thread hands their entries to the table-wide
        // checks in file order meanwhile (pieces that finish early wait in `waiting`).
        let next = std::sync::atomic::AtomicUsize::new(0);
        let (sender, receiver) = std::sync::mpsc::sync_channel(threads);
        std::thread::scope(|scope| {
            for _ in 0..threads {
                let (sender, next) = (sender.clone(), &next);
                scope.spawn(move || {
                    loop {
                        let piece = next.fetch_add(1, std::sync::atomic::Ordering::Relaxed);
                        if piece >= pieces.len()
                            || sender.send((piece, judge_piece(piece))).is_err()
                        {
                            break;
                        }
                    }
                });
            }
            drop(sender);
            let mut waiting = std::collections::BTreeMap::new();
            let mut expected = 0;
            for (piece, judged) in receiver {
                waiting.insert(piece, judged);
                while let Some((piece_findings, entries)) = waiting.remove(&expected) {
                    findings.extend(piece_findings);
                    entries.into_iter().for_each(|e| table.add(e));
                    expected += 1;
                }
            }
        });
    }
    findings.extend(table.finish(&files));
    findings.sort_by_key(|f| (f.file, f.span.start, f.rule.code()));
    Report { files, findings }
}
