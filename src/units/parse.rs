//! The unit-expression parser: `kJ/mol`, `L/(mol*s)`, `cm3/(molecule*s)`,
//! `M^-1*s^-1`, `1/(mol*s)`, `degC`.
//!
//! The grammar (NOTATION.md §3) is small: unit names joined by `*`, `·` or
//! `/`, integer powers with `^` (`s^-1`, also `s^(-1)`), parentheses, and
//! the number `1` as the numerator of a reciprocal (`1/s`). A length name
//! may carry a digit power directly (`cm3`, `dm3`, `m2`), as chemists write.
//!
//! The parser is built with chumsky and folds each product into a [`Unit`]
//! as it goes, so a long chain of factors never builds a deep tree. Nesting
//! of parentheses is limited (checked before parsing), so no input can
//! exhaust the stack. Degrees Celsius are accepted only as a whole unit (a
//! temperature); inside a compound unit they are rejected with a pointer to
//! K, because a compound of an offset scale has no single meaning.

use rustc_hash::FxHashMap as HashMap;
use std::cell::RefCell;
use std::ops::Range;

use chumsky::prelude::*;

use super::catalogue;
use super::dimension::Dimension;
use super::unit::Unit;

/// The deepest nesting of parentheses accepted in a unit.
pub const MAX_NESTING: usize = 16;

/// The largest power accepted after `^` (or as a length's digit suffix).
pub const MAX_POWER: i32 = 12;

/// The largest exponent of any base dimension in a parsed unit.
pub const MAX_DIMENSION_EXPONENT: i32 = 60;

/// Why a unit text was rejected, and where.
#[derive(Clone, Debug, PartialEq, Eq)]
pub struct UnitError {
    /// Byte range in the unit text that the message is about (always on
    /// character boundaries; empty at the end of the text when the unit
    /// stops early).
    pub span: Range<usize>,
    /// What is wrong and what to write instead (no trailing period).
    pub message: String,
    /// Replacement texts for `span`, best first; may be empty.
    pub suggestions: Vec<String>,
}

impl UnitError {
    fn new(span: Range<usize>, message: impl Into<String>) -> Self {
        UnitError {
            span,
            message: message.into(),
            suggestions: Vec::new(),
        }
    }

    fn with_suggestions(mut self, suggestions: Vec<String>) -> Self {
        self.suggestions = suggestions;
        self
    }
}

impl std::fmt::Display for UnitError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        f.write_str(&self.message)
    }
}

impl std::error::Error for UnitError {}

/// A parsed piece of a unit with the byte range it came from.
#[derive(Clone, Debug)]
struct Term {
    unit: Unit,
    span: Range<usize>,
}

type Value = Result<Term, UnitError>;
type Extra<'a> = extra::Err<Rich<'a, char>>;

/// How many distinct unit texts each thread remembers.
const CACHE_CAPACITY: usize = 4096;

thread_local! {
    /// Results of recent parses: reaction libraries repeat a handful of unit
    /// texts many thousands of times, and building the parser costs more
    /// than looking a text up. Keyed with a fast hash: the texts are
    /// short and the lookups many.
    static CACHE: RefCell<HashMap<Box<str>, Result<Unit, UnitError>>> =
        RefCell::new(HashMap::default());
}

/// Parses a unit expression into its SI factor, offset and dimension.
///
/// Never panics. An empty text is an error (a dimensionless quantity is
/// written without a unit, so the caller does not ask). Results are
/// remembered per thread for repeated texts.
pub fn parse_unit(text: &str) -> Result<Unit, UnitError> {
    if text.len() > 64 {
        return parse_unit_uncached(text);
    }
    let cached = CACHE
        .try_with(|c| c.try_borrow().ok().and_then(|m| m.get(text).cloned()))
        .ok()
        .flatten();
    if let Some(result) = cached {
        return result;
    }
    let result = parse_unit_uncached(text);
    let _ = CACHE.try_with(|c| {
        if let Ok(mut m) = c.try_borrow_mut() {
            if m.len() >= CACHE_CAPACITY {
                m.clear();
            }
            m.insert(text.into(), result.clone());
        }
    });
    result
}

fn parse_unit_uncached(text: &str) -> Result<Unit, UnitError> {
    if text.trim().is_empty() {
        return Err(UnitError::new(
            text.len()..text.len(),
            "expected a unit such as `kJ/mol` or `L/(mol*s)`",
        ));
    }
    check_nesting(text)?;
    match unit_parser().parse(text).into_result() {
        Ok(Ok(term)) => Ok(term.unit),
        Ok(Err(error)) => Err(error),
        Err(errors) => Err(match errors.first() {
            Some(error) => syntax_error(text, error),
            None => UnitError::new(0..text.len(), "this is not a unit"),
        }),
    }
}

/// Rejects parentheses nested deeper than [`MAX_NESTING`] before the
/// recursive parser sees them.
fn check_nesting(text: &str) -> Result<(), UnitError> {
    let mut depth = 0usize;
    for (i, c) in text.char_indices() {
        match c {
            '(' => {
                depth += 1;
                if depth > MAX_NESTING {
                    return Err(UnitError::new(
                        i..i + 1,
                        format!(
                            "parentheses in a unit may nest at most {MAX_NESTING} deep: simplify the unit"
                        ),
                    ));
                }
            }
            ')' => depth = depth.saturating_sub(1),
            _ => {}
        }
    }
    Ok(())
}

fn unit_parser<'a>() -> impl Parser<'a, &'a str, Value, Extra<'a>> {
    let ws = text::inline_whitespace();
    let product = recursive(|product| {
        let name = any()
            .filter(|c: &char| c.is_alphabetic() || *c == '°')
            .repeated()
            .at_least(1)
            .to_slice()
            .then(
                text::digits(10)
                    .to_slice()
                    .map_with(|s: &str, e| {
                        let span: SimpleSpan = e.span();
                        (s, span.into_range())
                    })
                    .or_not(),
            )
            .map_with(|(name, suffix), e| {
                let span: SimpleSpan = e.span();
                name_term(name, suffix, span.into_range())
            })
            .labelled("a unit name");

        let number = text::digits(10)
            .to_slice()
            .map_with(|digits: &str, e| {
                let span: SimpleSpan = e.span();
                number_term(digits, span.into_range())
            })
            .labelled("a unit name");

        let group = product
            .delimited_by(just('(').then(ws), ws.then(just(')')))
            .map_with(|inner: Value, e| {
                let span: SimpleSpan = e.span();
                inner.map(|t| Term {
                    unit: t.unit,
                    span: span.into_range(),
                })
            });

        let atom = choice((name, number, group)).boxed();

        let signed = one_of("+-\u{2212}")
            .or_not()
            .then(text::digits(10))
            .to_slice()
            .map_with(|s: &str, e| {
                let span: SimpleSpan = e.span();
                (s, span.into_range())
            })
            .labelled("an integer power");
        let exponent =
            just('^').ignore_then(choice((signed, signed.delimited_by(just('('), just(')')))));

        let power = atom
            .then(exponent.or_not())
            .map(|(base, exp)| match exp {
                None => base,
                Some((digits, span)) => apply_power(base?, digits, span),
            })
            .boxed();

        let op = choice((just('*'), just('·'), just('\u{22C5}'), just('/'))).padded_by(ws);

        power
            .clone()
            .foldl(op.then(power).repeated(), |left, (op, right)| {
                combine(left?, op, right?)
            })
            .boxed()
    });
    product.padded_by(ws).then_ignore(end())
}

/// One unit name, possibly with a digit power (`cm3`).
fn name_term(name: &str, suffix: Option<(&str, Range<usize>)>, span: Range<usize>) -> Value {
    let name_span = span.start..span.start + name.len();
    let Some(unit) = catalogue::lookup(name) else {
        return Err(unknown_name(name, name_span));
    };
    let Some((digits, _)) = suffix else {
        return Ok(Term { unit, span });
    };
    if unit.dim != Dimension::LENGTH {
        return Err(UnitError::new(
            span,
            format!(
                "`{name}{digits}`: only lengths take a power written as digits (cm3, m2); write `{name}^{digits}`"
            ),
        )
        .with_suggestions(vec![format!("{name}^{digits}")]));
    }
    let power = digits
        .parse::<i32>()
        .ok()
        .filter(|n| (1..=MAX_POWER).contains(n));
    let Some(power) = power else {
        return Err(UnitError::new(
            span,
            format!("`{name}{digits}`: a length power must be between 1 and {MAX_POWER}"),
        ));
    };
    let unit = unit
        .checked_powi(power)
        .ok_or_else(|| UnitError::new(span.clone(), "this unit power is out of range"))?;
    Ok(Term { unit, span })
}

fn unknown_name(name: &str, span: Range<usize>) -> UnitError {
    let suggestions = catalogue::suggest(name);
    let message = match suggestions.first() {
        Some(best) => format!("unknown unit `{name}`: did you mean `{best}`?"),
        None => format!("unknown unit `{name}`"),
    };
    UnitError::new(span, message).with_suggestions(suggestions)
}

/// A bare number: only `1` (the numerator of `1/s`) belongs in a unit.
fn number_term(digits: &str, span: Range<usize>) -> Value {
    if digits == "1" {
        return Ok(Term {
            unit: Unit::DIMENSIONLESS,
            span,
        });
    }
    Err(UnitError::new(
        span,
        format!("a unit cannot contain the number `{digits}`: put the factor into the value"),
    ))
}

fn celsius_in_compound(span: Range<usize>) -> UnitError {
    UnitError::new(
        span,
        "°C can only stand alone as a temperature: inside a compound unit write K (a difference of 1 °C is 1 K)",
    )
    .with_suggestions(vec!["K".to_string()])
}

fn apply_power(base: Term, digits: &str, span: Range<usize>) -> Value {
    if base.unit.is_affine() {
        return Err(celsius_in_compound(base.span));
    }
    let normalised = digits.replace('\u{2212}', "-");
    let power = normalised
        .parse::<i32>()
        .ok()
        .filter(|n| n.abs() <= MAX_POWER);
    let Some(power) = power else {
        return Err(UnitError::new(
            span,
            format!(
                "the power `{digits}` is too large: powers from -{MAX_POWER} to {MAX_POWER} are accepted"
            ),
        ));
    };
    if power == 0 {
        return Err(UnitError::new(
            span,
            "a power of 0 leaves no unit: remove this factor",
        ));
    }
    let whole = base.span.start..span.end;
    let unit = base
        .unit
        .checked_powi(power)
        .filter(|u| u.dim.max_abs_exponent() <= MAX_DIMENSION_EXPONENT)
        .ok_or_else(|| UnitError::new(whole.clone(), "this unit power is out of range"))?;
    Ok(Term { unit, span: whole })
}

fn combine(left: Term, op: char, right: Term) -> Value {
    if left.unit.is_affine() {
        return Err(celsius_in_compound(left.span));
    }
    if right.unit.is_affine() {
        return Err(celsius_in_compound(right.span));
    }
    let whole = left.span.start..right.span.end;
    let unit = if op == '/' {
        left.unit.checked_div(&right.unit)
    } else {
        left.unit.checked_mul(&right.unit)
    };
    let unit = unit
        .filter(|u| u.dim.max_abs_exponent() <= MAX_DIMENSION_EXPONENT)
        .ok_or_else(|| UnitError::new(whole.clone(), "this unit power is out of range"))?;
    Ok(Term { unit, span: whole })
}

/// Turns a chumsky syntax error into a message a chemist can act on.
fn syntax_error(text: &str, error: &Rich<'_, char>) -> UnitError {
    let span = error.span().into_range();
    let start = span.start.min(text.len());
    let before = &text[..floor_boundary(text, start)];
    match error.found() {
        None => UnitError::new(
            text.len()..text.len(),
            format!("the unit ends early: expected {}", expected_list(error)),
        ),
        Some(c) if (c.is_alphabetic() || *c == '(') && before.ends_with(char::is_whitespace) => {
            let gap_start = before.trim_end().len();
            UnitError::new(
                gap_start..start,
                "join unit names with `*` or `/`, not a space",
            )
            .with_suggestions(vec!["*".to_string()])
        }
        Some('.') if is_after_power(before) => UnitError::new(
            span,
            "unit powers must be whole numbers: write the unit without a fractional power",
        ),
        Some(c) if c.is_ascii_digit() && before.ends_with(')') => {
            UnitError::new(span, "write a power of a group with `^`, as in `(mol/L)^2`")
                .with_suggestions(vec![format!("^{c}")])
        }
        Some(c) => UnitError::new(
            span,
            format!(
                "unexpected `{c}` in the unit: expected {}",
                expected_list(error)
            ),
        ),
    }
}

/// True when `before` ends in `^` and an integer (`m^1` before `.5`).
fn is_after_power(before: &str) -> bool {
    match before.rsplit_once('^') {
        Some((_, power)) => {
            let digits = power.trim_start_matches(['+', '-', '\u{2212}', '(']);
            !digits.is_empty() && digits.bytes().all(|b| b.is_ascii_digit())
        }
        None => false,
    }
}

fn floor_boundary(text: &str, mut i: usize) -> usize {
    while i > 0 && !text.is_char_boundary(i) {
        i -= 1;
    }
    i
}

fn expected_list(error: &Rich<'_, char>) -> String {
    use chumsky::error::RichPattern;
    let mut saw_digit = false;
    let mut items: Vec<String> = error
        .expected()
        .filter_map(|p| match p {
            RichPattern::Token(t) => match **t {
                '*' | '·' | '\u{22C5}' => Some("`*`".to_string()),
                c if c.is_whitespace() => None,
                c => Some(format!("`{c}`")),
            },
            RichPattern::EndOfInput => Some("the end of the unit".to_string()),
            RichPattern::Label(l) if l == "digit" => {
                saw_digit = true;
                None
            }
            RichPattern::Label(l) if l.contains("whitespace") => None,
            RichPattern::Label(l) => Some(l.to_string()),
            _ => None,
        })
        .collect();
    items.sort();
    items.dedup();
    if items.is_empty() && saw_digit {
        items.push("a digit".to_string());
    }
    match items.len() {
        0 => "a unit name".to_string(),
        1 => items.remove(0),
        _ => {
            let last = items.pop().unwrap_or_default();
            format!("{} or {last}", items.join(", "))
        }
    }
}

#[cfg(test)]
#[allow(clippy::unwrap_used)] // Tests may panic on a broken expectation.
mod tests {
    use super::*;
    use crate::units::constants::{AVOGADRO, CALORIE};

    fn close(a: f64, b: f64) -> bool {
        (a - b).abs() <= 1e-12 * b.abs().max(1e-300)
    }

    #[test]
    fn compound_units_fold_to_si() {
        // Definitions: 1 L = 1e-3 m^3 (SI Brochure Table 8), thermochemical
        // calorie = 4.184 J (NIST SP 811 B.8).
        let u = parse_unit("L/(mol*s)").unwrap();
        assert!(close(u.factor, 1e-3));
        assert_eq!(u.dim, Dimension::rate_constant(2));
        let u = parse_unit("kcal/mol").unwrap();
        assert!(close(u.factor, 1e3 * CALORIE));
        let u = parse_unit("cm3/(molecule*s)").unwrap();
        assert!(close(u.factor, 1e-6 * AVOGADRO));
        assert_eq!(u.dim, Dimension::rate_constant(2));
        let u = parse_unit("M^-1*s^-1").unwrap();
        assert!(close(u.factor, 1e-3));
        let u = parse_unit("1/(mol*s)").unwrap();
        assert_eq!(u.dim, Dimension::new(0, 0, -1, -1, 0));
        let u = parse_unit("J · mol^(-1) · K^−1").unwrap();
        assert_eq!(u.dim, Dimension::MOLAR_ENTROPY);
        let u = parse_unit("(mol/L)^2").unwrap();
        assert_eq!(u.dim, Dimension::concentration_pow(2));
        assert!(close(u.factor, 1e6));
    }

    #[test]
    fn celsius_stands_alone_only() {
        let u = parse_unit("°C").unwrap();
        assert!(close(u.to_si(25.0), 298.15));
        assert!(parse_unit(" degC ").is_ok());
        let e = parse_unit("J/(mol*degC)").unwrap_err();
        assert_eq!(&"J/(mol*degC)"[e.span.clone()], "degC");
        assert_eq!(e.suggestions, vec!["K".to_string()]);
        let e = parse_unit("°C^2").unwrap_err();
        assert_eq!(&"°C^2"[e.span.clone()], "°C");
    }

    #[test]
    fn unknown_names_get_suggestions_and_spans() {
        let e = parse_unit("kJ/mole").unwrap_err();
        assert_eq!(e.span, 3..7);
        assert_eq!(e.suggestions.first().map(String::as_str), Some("mol"));
        // Spans are byte ranges: `µ` takes two bytes.
        let e = parse_unit("µm/torr").unwrap_err();
        assert_eq!(e.span, 4..8);
        assert_eq!(e.suggestions, vec!["Torr".to_string()]);
        let e = parse_unit("µmolx").unwrap_err();
        assert_eq!(&"µmolx"[e.span.clone()], "µmolx");
    }

    #[test]
    fn syntax_errors_point_at_the_problem() {
        let e = parse_unit("J/(mol K)").unwrap_err();
        assert_eq!(e.span, 6..7);
        assert_eq!(e.suggestions, vec!["*".to_string()]);
        let e = parse_unit("L/(mol*s").unwrap_err();
        assert_eq!(e.span, 8..8);
        assert!(e.message.contains("ends early"), "{}", e.message);
        let e = parse_unit("s2").unwrap_err();
        assert_eq!(e.suggestions, vec!["s^2".to_string()]);
        let e = parse_unit("(mol/L)2").unwrap_err();
        assert!(e.message.contains('^'), "{}", e.message);
        let e = parse_unit("M^1.5").unwrap_err();
        assert!(e.message.contains("whole numbers"), "{}", e.message);
        let e = parse_unit("mol/L)").unwrap_err();
        assert_eq!(e.span, 5..6);
        assert!(!e.message.contains("whitespace"), "{}", e.message);
        let e = parse_unit("10*s").unwrap_err();
        assert_eq!(e.span, 0..2);
        assert!(parse_unit("").is_err());
        assert!(parse_unit("s^0").is_err());
        assert!(parse_unit("s^99999999999").is_err());
        assert!(parse_unit("m^12*m^12*m^12*m^12*m^12*m").is_err());
    }

    #[test]
    fn deep_nesting_is_an_error_not_a_crash() {
        let deep = format!("{}s{}", "(".repeat(100_000), ")".repeat(100_000));
        let e = parse_unit(&deep).unwrap_err();
        assert_eq!(e.span, MAX_NESTING..MAX_NESTING + 1);
        let ok = format!("{}s{}", "(".repeat(MAX_NESTING), ")".repeat(MAX_NESTING));
        assert!(parse_unit(&ok).is_ok());
    }

    #[test]
    fn long_chains_do_not_recurse() {
        let long = vec!["s/s"; 50_000].join("*");
        assert_eq!(parse_unit(&long).unwrap().dim, Dimension::DIMENSIONLESS);
    }
}
