//! Numbers typed on the command line: temperatures with their unit, potentials, pH and step
//! counts, each refused with a reason when it is not finite or beyond any sensible value.

/// Bare numbers below this are refused as temperatures: nobody runs an aqueous cell at
/// 200 K, but everybody has typed 25 meaning 25 °C.
const LOWEST_BARE_KELVIN: f64 = 200.0;
/// No model of the project (Kw, A(T), the dielectric constant of water) reaches beyond this.
const HIGHEST_KELVIN: f64 = 1000.0;
/// The range of liquid water at 1 bar, which is the range of the project's activity models.
const WATER_KELVIN: (f64, f64) = (273.15, 373.15);
/// |E| above this is no electrode potential on any scale couplet prints (tabulated aqueous
/// couples span about −3.1 V to +3.1 V vs SHE; vs Li+/Li they reach about +6 V).
const LARGEST_VOLTS: f64 = 10.0;
/// pH outside this range describes no aqueous solution (common practice, from memory).
const PH_RANGE: (f64, f64) = (-2.0, 16.0);
/// The most steps a discharge curve is computed in.
pub const MAX_STEPS: usize = 10_000;

fn number(text: &str) -> Result<f64, String> {
    let value: f64 = text
        .trim()
        .parse()
        .map_err(|_| format!("'{text}' is not a number"))?;
    if !value.is_finite() {
        return Err(format!("'{text}' is not a finite number"));
    }
    Ok(value)
}

/// Reads a temperature to kelvin: `25C`, `25 °C`, `25degC`, `298.15K`, `298.15 K`, or a bare
/// number of kelvins (at least 200). Warns on standard error outside liquid water at 1 bar.
pub fn temperature(text: &str) -> Result<f64, String> {
    let trimmed = text.trim();
    let (digits, celsius, bare) = if let Some(rest) = ["°C", "ºC", "degC", "C", "c"]
        .iter()
        .find_map(|unit| trimmed.strip_suffix(unit))
    {
        (rest, true, false)
    } else if let Some(rest) = trimmed.strip_suffix(['K', 'k']) {
        (rest, false, false)
    } else {
        (trimmed, false, true)
    };
    let value = number(digits.trim_end())?;
    let kelvin = if celsius { value + 273.15 } else { value };
    if bare && kelvin < LOWEST_BARE_KELVIN {
        return Err(format!(
            "a bare number is kelvin, and {value} K is far below any aqueous cell: write {value}C for {value} °C, or {}K",
            value + 273.15
        ));
    }
    if kelvin <= 0.0 {
        return Err(format!(
            "{trimmed} is at or below absolute zero ({kelvin} K)"
        ));
    }
    if kelvin > HIGHEST_KELVIN {
        return Err(format!(
            "{trimmed} ({kelvin} K) is beyond every model couplet uses (at most {HIGHEST_KELVIN} K)"
        ));
    }
    if kelvin < WATER_KELVIN.0 || kelvin > WATER_KELVIN.1 {
        say!(
            "warning: {} K is outside 0–100 °C, the range of liquid water at 1 bar and of the activity models; figures there are extrapolations",
            couplet::figures::significant(kelvin, 5)
        );
    }
    Ok(kelvin)
}

/// Reads a potential in volts: finite and within ±10 V.
pub fn volts(text: &str) -> Result<f64, String> {
    let value = number(text)?;
    if value.abs() > LARGEST_VOLTS {
        return Err(format!(
            "{} V is no electrode potential (|E| ≤ {LARGEST_VOLTS} V); millivolts typed as volts?",
            couplet::figures::significant(value, 6)
        ));
    }
    Ok(value)
}

/// Reads a pH: finite and within −2 to 16.
pub fn ph(text: &str) -> Result<f64, String> {
    let value = number(text)?;
    if value < PH_RANGE.0 || value > PH_RANGE.1 {
        return Err(format!(
            "pH {} is outside {} to {}, beyond any aqueous solution",
            couplet::figures::significant(value, 6),
            PH_RANGE.0,
            PH_RANGE.1
        ));
    }
    Ok(value)
}

/// Reads the number of discharge steps: 1 to [`MAX_STEPS`].
pub fn steps(text: &str) -> Result<usize, String> {
    let steps: usize = text
        .trim()
        .parse()
        .map_err(|_| format!("'{text}' is not a whole number of steps"))?;
    if steps == 0 || steps > MAX_STEPS {
        return Err(format!(
            "{steps} steps: give 1 to {MAX_STEPS} (a curve of {MAX_STEPS} steps is already smooth)"
        ));
    }
    Ok(steps)
}

/// Refuses a species named twice, within one option or across options (`--activity Cu2+=0.1
/// --molality Cu2+=0.1`): which value was meant cannot be guessed, and adding them is rarely what
/// was meant.
pub fn refuse_repeats<'a>(
    given: impl IntoIterator<Item = (&'a str, &'a couplet::notation::Species)>,
) -> Result<(), String> {
    let mut seen: Vec<(&str, &couplet::notation::Species)> = Vec::new();
    for (option, species) in given {
        if let Some((first, _)) = seen.iter().find(|(_, s)| *s == species) {
            let options = if *first == option {
                option.to_owned()
            } else {
                format!("{first} and {option}")
            };
            return Err(format!(
                "{} is given twice ({options}): give each species once",
                species.ascii()
            ));
        }
        seen.push((option, species));
    }
    Ok(())
}

/// Splits `SPECIES=VALUE` given to `option` (the value is the text after the last `=`).
pub fn species_value<'a>(
    option: &str,
    item: &'a str,
) -> Result<(couplet::notation::Species, &'a str), String> {
    let (name, value) = item
        .rsplit_once('=')
        .ok_or_else(|| format!("{option} {item}: expected SPECIES=VALUE"))?;
    let species = couplet::notation::parse_species(name.trim())
        .map_err(|e| format!("{option} {item}: {}", e.message))?;
    Ok((species, value.trim()))
}

/// Reads every `SPECIES=NUMBER` of one option: finite numbers, each species once.
pub fn species_numbers(
    option: &str,
    items: &[String],
) -> Result<Vec<(couplet::notation::Species, f64)>, String> {
    let pairs = items
        .iter()
        .map(|item| {
            let (species, value) = species_value(option, item)?;
            let value = number(value).map_err(|e| format!("{option} {item}: {e}"))?;
            Ok((species, value))
        })
        .collect::<Result<Vec<_>, String>>()?;
    refuse_repeats(pairs.iter().map(|(s, _)| (option, s)))?;
    Ok(pairs)
}
