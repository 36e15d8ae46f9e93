//! A couple that no potential table lists, made from formation data: the half-reaction is
//! read (or balanced from `Ox/Red`), and its E° and dE°/dT come from ΔrG° and ΔrS°.

use super::{FormationData, ReactionThermo, ThermoError, reaction_thermo};
use crate::balance::{BalanceError, BalanceOptions, ElectronRule, Medium as Solvent, balance};
use crate::notation::{Arrow, Equation, NotationError, Term, parse_equation};
use crate::reaction::Reaction;
use crate::table::{Couple, CoupleError, Medium, Origin, is_reaction_text, parse_couple_notation};

/// Why a couple could not be made from formation data.
#[derive(Clone, Debug, PartialEq, thiserror::Error)]
#[non_exhaustive]
pub enum FromDataError {
    /// The query does not parse.
    #[error("{0}")]
    Notation(NotationError),
    /// The query is neither a half-reaction nor `Ox/Red`.
    #[error("'{0}' is neither a half-reaction nor a couple written Ox/Red")]
    NotACouple(String),
    /// The half-reaction does not balance in the medium.
    #[error("{0}")]
    Balance(BalanceError),
    /// The balanced reaction is no reduction half-reaction.
    #[error("{0}")]
    Couple(CoupleError),
    /// Some species lacks data.
    #[error("{0}")]
    Thermo(ThermoError),
}

/// The couple and the figures it was computed from.
#[derive(Clone, Debug)]
pub struct DataCouple<'a> {
    /// The couple: E° vs SHE at 298.15 K, dE°/dT, origin [`Origin::FormationData`].
    pub couple: Couple,
    /// The reaction figures and the rows used.
    pub thermo: ReactionThermo<'a>,
    /// How the half-reaction was had, when couplet balanced it.
    pub balanced_in: Option<Medium>,
}

fn solvent(medium: Option<Medium>) -> Solvent {
    match medium {
        Some(Medium::Base) => Solvent::Base,
        Some(Medium::Neutral) => Solvent::None,
        Some(Medium::Acid) | None => Solvent::Acid,
    }
}

fn equation_of(query: &str) -> Result<Equation, FromDataError> {
    if is_reaction_text(query) {
        return parse_equation(query).map_err(FromDataError::Notation);
    }
    match parse_couple_notation(query) {
        Some(Ok((ox, red))) => {
            let term = |species| Term {
                coefficient: crate::notation::Coefficient::from_integer(1),
                span: Default::default(),
                species,
            };
            Ok(Equation {
                reactants: vec![term(ox)],
                products: vec![term(red)],
                arrow: Arrow::Forward,
            })
        }
        Some(Err(error)) => Err(FromDataError::Notation(error)),
        None => Err(FromDataError::NotACouple(query.to_owned())),
    }
}

/// The couple a query (a half-reaction, or `Ox/Red`) names, from formation data. A typed
/// half-reaction that balances as written is taken as it is; otherwise, and for `Ox/Red`,
/// couplet balances it in the medium (acid when none is given), adding H2O, H+ or OH- and e-.
pub fn couple_from_data<'a>(
    query: &str,
    medium: Option<Medium>,
    data: &'a FormationData,
) -> Result<DataCouple<'a>, FromDataError> {
    let equation = equation_of(query.trim())?;
    let written = Reaction::from_equation(&equation);
    let (reaction, balanced_in) = if equation.has_electrons() && written.imbalance().is_balanced() {
        (written, None)
    } else {
        let options = BalanceOptions {
            medium: solvent(medium),
            electrons: ElectronRule::Always,
            ..BalanceOptions::default()
        };
        let balanced = balance(&equation, &options).map_err(FromDataError::Balance)?;
        let used = match balanced.medium() {
            Solvent::Acid => Medium::Acid,
            Solvent::Base => Medium::Base,
            Solvent::None => Medium::Neutral,
        };
        (balanced.reaction().clone(), Some(used))
    };
    let thermo = reaction_thermo(&reaction, data, None).map_err(FromDataError::Thermo)?;
    let e0 = thermo.e0_volts().unwrap_or(f64::NAN);
    let mut couple = Couple::from_reaction(reaction, e0).map_err(FromDataError::Couple)?;
    couple.dedt_millivolts_per_kelvin = thermo.dedt_millivolts_per_kelvin();
    couple.origin = Origin::FormationData;
    couple.source = Some(format!(
        "computed from formation data, E° = −ΔrG°/(nF) ({})",
        thermo.table_keys().join(", ")
    ));
    couple.note = Some(thermo.rows_used().join("; "));
    Ok(DataCouple {
        couple,
        thermo,
        balanced_in,
    })
}

/// E° and dE°/dT of a couple's half-reaction from formation data, for showing beside a
/// table value; `None` when some species lacks data.
pub fn e0_from_data<'a>(couple: &Couple, data: &'a FormationData) -> Option<ReactionThermo<'a>> {
    let thermo = reaction_thermo(&couple.reaction, data, None).ok()?;
    thermo
        .e0_volts()
        .is_some_and(f64::is_finite)
        .then_some(thermo)
}

/// A reaction read from text and its figures from formation data.
#[derive(Clone, Debug)]
pub struct TextReaction<'a> {
    /// The reaction as used: as written when it balances, else balanced by couplet.
    pub reaction: Reaction,
    /// The figures.
    pub thermo: ReactionThermo<'a>,
    /// The medium couplet balanced it in, when it did.
    pub balanced_in: Option<Medium>,
    /// True for a half-reaction (E° is then versus SHE).
    pub half: bool,
}

/// The figures of any reaction typed as text: a half-reaction or `Ox/Red` (see
/// [`couple_from_data`]), or a whole reaction, taken as written when it balances and
/// otherwise balanced with the species written, plus H2O and H+ (acid) or OH- (base) only
/// when a medium is given. n of a whole reaction comes from oxidation numbers.
pub fn reaction_from_text<'a>(
    query: &str,
    medium: Option<Medium>,
    data: &'a FormationData,
) -> Result<TextReaction<'a>, FromDataError> {
    let query = query.trim();
    let equation = equation_of(query)?;
    if equation.has_electrons() || !is_reaction_text(query) {
        let found = couple_from_data(query, medium, data)?;
        return Ok(TextReaction {
            reaction: found.couple.reaction,
            thermo: found.thermo,
            balanced_in: found.balanced_in,
            half: true,
        });
    }
    let written = Reaction::from_equation(&equation);
    let (reaction, balanced_in) = if written.imbalance().is_balanced() {
        (written, None)
    } else {
        let options = BalanceOptions {
            medium: medium.map_or(Solvent::None, |m| solvent(Some(m))),
            electrons: ElectronRule::Never,
            ..BalanceOptions::default()
        };
        let balanced = balance(&equation, &options).map_err(FromDataError::Balance)?;
        (
            balanced.reaction().clone(),
            Some(medium.unwrap_or(Medium::Neutral)),
        )
    };
    let electrons = crate::oxidation::oxidation_number_electrons(&reaction)
        .and_then(|n| num_traits::ToPrimitive::to_f64(&n))
        .filter(|n| *n > 0.0);
    let thermo = reaction_thermo(&reaction, data, electrons).map_err(FromDataError::Thermo)?;
    Ok(TextReaction {
        reaction,
        thermo,
        balanced_in,
        half: false,
    })
}
