//! `periods`: Ω and R over α and β, τ and ν at one modulus, by series and by path integration.

use super::{CommandError, FamilyRequest, Outcome};
use crate::curve::series_periods;
use crate::input::numbers::parse_modulus;
use crate::output::records::{pretty, Document, Inputs, PeriodsRecord, PERIODS_NOTE};
use crate::output::tables::periods_table;
use crate::precision::{check_digits, working_bits};
use serde::Serialize;
use std::time::Instant;

/// Where to compute the periods.
#[derive(Debug, Clone)]
#[cfg_attr(feature = "cli", derive(clap::Args))]
pub struct PeriodsRequest {
    #[cfg_attr(feature = "cli", command(flatten))]
    pub family: FamilyRequest,
    /// The modulus a (a decimal number above the spectral threshold, read at the working
    /// precision).
    #[cfg_attr(feature = "cli", arg(long, allow_hyphen_values = true))]
    pub modulus: String,
    /// Decimal digits of the working precision (8 to 1000).
    #[cfg_attr(feature = "cli", arg(long, default_value_t = super::defaults::DIGITS, allow_negative_numbers = true))]
    pub digits: u32,
}

#[derive(Serialize)]
struct Options {
    modulus: String,
    digits: u32,
}

/// The periods at the requested modulus.
///
/// # Errors
/// See [`CommandError`].
pub fn periods(request: &PeriodsRequest) -> Result<Outcome, CommandError> {
    check_digits(request.digits)?;
    let sel = request.family.resolve()?;
    let bits = working_bits(request.digits as f64);
    let a = parse_modulus(&request.modulus, bits, &sel.laurent)?;
    let start = Instant::now();
    let ac = rug::Complex::with_val(bits, (&a, 0));
    let cmp = series_periods::compare(&sel.laurent, &ac)?;
    let elapsed = start.elapsed().as_secs_f64();
    let inputs = Inputs {
        family: request.family.inputs(&sel),
        options: Options {
            modulus: request.modulus.clone(),
            digits: request.digits,
        },
    };
    let id = sel.family.id;
    let doc = Document::new(
        PeriodsRecord::new(id, &a, &cmp, request.digits),
        inputs,
        Some(bits),
        elapsed,
    )
    .noting(PERIODS_NOTE);
    // The modulus as read (at the digits asked for), not as typed.
    let text = periods_table(
        id,
        &crate::output::decimal::decimal(&a, request.digits),
        &cmp,
        request.digits,
        bits,
        elapsed,
    );
    Ok(Outcome::printed(pretty(&doc), text, elapsed))
}
