//! The periodic table: symbols, names, atomic numbers, standard atomic weights and
//! electronegativities, read from `data/elements.csv`, which is compiled into the binary.
//!
//! The file carries a source line for every column; this module only reads it. Besides the
//! 118 elements it has two rows for the hydrogen isotopes D and T, which formulas may use as
//! if they were elements (`D2O`): they are conserved separately when balancing and behave as
//! hydrogen when oxidation numbers are assigned.

use std::fmt;
use std::sync::LazyLock;

/// The element table exactly as shipped, for tools that want to show or re-check it.
pub const ELEMENTS_CSV: &str = include_str!("../data/elements.csv");

/// How the atomic weight of an element was obtained.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub enum WeightKind {
    /// IUPAC/CIAAW 2021 abridged standard atomic weight.
    Abridged,
    /// The element has no standard atomic weight; the value is the mass number of its
    /// longest-lived isotope, good enough for a rough molar mass only.
    MassNumber,
    /// The atomic mass of one nuclide (D, T).
    NuclideMass,
}

/// One row of the element table.
#[derive(Clone, Debug)]
pub struct ElementData {
    /// Atomic number (1 for D and T).
    pub atomic_number: u8,
    /// Symbol as written in formulas.
    pub symbol: &'static str,
    /// IUPAC name in English.
    pub name: &'static str,
    /// IUPAC group 1–18; `None` for the f-block.
    pub group: Option<u8>,
    /// Period 1–7.
    pub period: u8,
    /// Atomic weight in g/mol (see [`WeightKind`] for what the number means).
    pub atomic_weight: f64,
    /// What `atomic_weight` is.
    pub weight_kind: WeightKind,
    /// Pauling electronegativity, where defined.
    pub electronegativity: Option<f64>,
}

/// An element (or the isotope labels D and T), as an index into the element table.
///
/// Ordering follows the table: by atomic number, with D and T after all elements.
#[derive(Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub struct Element(u8);

static TABLE: LazyLock<Vec<ElementData>> = LazyLock::new(|| {
    parse_table(ELEMENTS_CSV).unwrap_or_else(|message| {
        // The file is compiled in and checked by the test suite, so this is a build defect.
        panic!("data/elements.csv is malformed: {message}")
    })
});

/// Symbol lookup by letters: `[first - 'A'][second - 'a' + 1]`, column 0 for one-letter
/// symbols. The parser looks symbols up millions of times a second, so no hashing.
static BY_LETTERS: LazyLock<[[u8; 27]; 26]> = LazyLock::new(|| {
    let mut grid = [[NONE; 27]; 26];
    for (index, row) in TABLE.iter().enumerate() {
        if let Some((first, second)) = symbol_cell(row.symbol) {
            grid[first][second] = index as u8;
        }
    }
    grid
});

const NONE: u8 = u8::MAX;

fn symbol_cell(symbol: &str) -> Option<(usize, usize)> {
    let bytes = symbol.as_bytes();
    let first = *bytes.first()?;
    if !first.is_ascii_uppercase() {
        return None;
    }
    let second = match bytes.get(1) {
        None => 0,
        Some(b) if b.is_ascii_lowercase() && bytes.len() == 2 => (b - b'a' + 1) as usize,
        Some(_) => return None,
    };
    Some(((first - b'A') as usize, second))
}

fn parse_table(text: &'static str) -> Result<Vec<ElementData>, String> {
    let mut rows = Vec::with_capacity(120);
    let mut header_seen = false;
    for (index, line) in text.lines().enumerate() {
        let line = line.trim();
        if line.is_empty() || line.starts_with('#') {
            continue;
        }
        if !header_seen {
            header_seen = true;
            continue;
        }
        let fields: Vec<&'static str> = line.split(',').map(str::trim).collect();
        let at = |what: &str| format!("line {}: bad {what}", index + 1);
        if fields.len() != 8 {
            return Err(format!("line {}: expected 8 fields", index + 1));
        }
        let optional_u8 = |s: &str| -> Result<Option<u8>, String> {
            if s.is_empty() {
                Ok(None)
            } else {
                s.parse().map(Some).map_err(|_| at("group"))
            }
        };
        rows.push(ElementData {
            atomic_number: fields[0].parse().map_err(|_| at("atomic number"))?,
            symbol: fields[1],
            name: fields[2],
            group: optional_u8(fields[3])?,
            period: fields[4].parse().map_err(|_| at("period"))?,
            atomic_weight: fields[5].parse().map_err(|_| at("atomic weight"))?,
            weight_kind: match fields[6] {
                "abridged" => WeightKind::Abridged,
                "mass_number" => WeightKind::MassNumber,
                "nuclide_mass" => WeightKind::NuclideMass,
                _ => return Err(at("weight kind")),
            },
            electronegativity: if fields[7].is_empty() {
                None
            } else {
                Some(fields[7].parse().map_err(|_| at("electronegativity"))?)
            },
        });
    }
    Ok(rows)
}

impl Element {
    /// Every entry of the table, in table order.
    pub fn all() -> impl Iterator<Item = Element> {
        (0..TABLE.len()).map(|i| Element(i as u8))
    }

    /// Looks a symbol up exactly (case-sensitive: `Co` is cobalt, `CO` is two symbols).
    pub fn from_symbol(symbol: &str) -> Option<Element> {
        let (first, second) = symbol_cell(symbol)?;
        match BY_LETTERS[first][second] {
            NONE => None,
            index => Some(Element(index)),
        }
    }

    /// The row of the element table.
    pub fn data(self) -> &'static ElementData {
        &TABLE[self.0 as usize]
    }

    /// Symbol as written in formulas.
    pub fn symbol(self) -> &'static str {
        self.data().symbol
    }

    /// Atomic number (1 for D and T).
    pub fn atomic_number(self) -> u8 {
        self.data().atomic_number
    }

    /// True for the isotope labels D and T.
    pub fn is_isotope_label(self) -> bool {
        self.data().weight_kind == WeightKind::NuclideMass
    }

    /// The chemical element: hydrogen for D and T, the element itself otherwise.
    pub fn chemical_element(self) -> Element {
        if self.is_isotope_label() {
            Element::from_symbol("H").expect("hydrogen is in the table")
        } else {
            self
        }
    }
}

impl fmt::Debug for Element {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.symbol())
    }
}

impl fmt::Display for Element {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.symbol())
    }
}
