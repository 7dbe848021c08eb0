//! Reading one species token (`K4[Fe(CN)6]`, `SO₄²⁻`, `CuSO4·5H2O`, `Fe3+(aq)`)
//! into its composition, charge and phase.
//!
//! The notation is section 2 of the stoik notation reference. The lexer of
//! the file format has already cut the token out of its line, so there is
//! never whitespace inside. The parser is hand-written and works on one flat
//! list of atoms with an explicit stack of open brackets: nesting depth is
//! limited to [`MAX_DEPTH`] and never uses the call stack, every count is
//! checked for overflow, and every error carries a byte span that lies on
//! character boundaries of the token.

use std::fmt;
use std::ops::Range;

use num_rational::Ratio;
use num_traits::{CheckedAdd, CheckedMul, One, ToPrimitive, Zero};

use super::elements::{self, Element};

/// How deeply `()` and `[]` groups may nest before the parser refuses.
pub const MAX_DEPTH: usize = 32;

/// Molar mass of the electron in g/mol: the CODATA 2022 recommended value
/// 5.4857990962e-4 g/mol as scipy.constants gives it (checked in
/// `tests/chem_reference.rs`).
pub const ELECTRON_MOLAR_MASS: f64 = 5.485_799_096_2e-4;

/// Elements whose homonuclear diatomic ions are common enough that the
/// monatomic-ion shorthand (`O2-` read as oxide) deserves a note.
const DIATOMIC_IONS: [u8; 10] = [1, 6, 7, 8, 9, 16, 17, 35, 53, 80];

/// The physical state named by a phase tag.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Phase {
    Gas,
    Liquid,
    Solid,
    Aqueous,
}

impl Phase {
    /// The tag as written between the parentheses: `g`, `l`, `s`, `aq`.
    pub fn tag(self) -> &'static str {
        match self {
            Phase::Gas => "g",
            Phase::Liquid => "l",
            Phase::Solid => "s",
            Phase::Aqueous => "aq",
        }
    }

    /// The phase for a tag written without its parentheses.
    pub fn from_tag(tag: &str) -> Option<Phase> {
        match tag {
            "g" => Some(Phase::Gas),
            "l" => Some(Phase::Liquid),
            "s" => Some(Phase::Solid),
            "aq" => Some(Phase::Aqueous),
            _ => None,
        }
    }
}

/// What sort of species a token names.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum SpeciesKind {
    /// Atoms with counts, possibly charged: `H2O`, `Fe^3+`.
    Compound,
    /// `e-`: charge -1, no atoms.
    Electron,
    /// `M`: any collision partner, outside the element balance.
    ThirdBody,
    /// `hv`: a photon, no atoms and no charge.
    Photon,
}

/// A parsed species: what it is made of, its charge and phase.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Formula {
    pub kind: SpeciesKind,
    /// Atomic number and count, sorted by atomic number, no zero counts.
    pub composition: Vec<(u8, Ratio<i64>)>,
    /// Charge in elementary charges.
    pub charge: i64,
    pub phase: Option<Phase>,
    /// Set when another reading of the text is plausible: says how it was
    /// read and how to write the other reading.
    pub reading_note: Option<String>,
}

impl Formula {
    fn special(kind: SpeciesKind, charge: i64, phase: Option<Phase>) -> Formula {
        Formula {
            kind,
            composition: Vec::new(),
            charge,
            phase,
            reading_note: None,
        }
    }

    /// Molar mass in g/mol from the CIAAW 2021 weights of [`elements`].
    ///
    /// The electron mass of an ion's missing or extra electrons is ignored
    /// (common practice); the electron itself has the CODATA electron molar
    /// mass, and `M` and `hv` have none.
    pub fn molar_mass(&self) -> f64 {
        match self.kind {
            SpeciesKind::Electron => ELECTRON_MOLAR_MASS,
            SpeciesKind::ThirdBody | SpeciesKind::Photon => 0.0,
            SpeciesKind::Compound => self
                .composition
                .iter()
                .map(|(z, n)| {
                    let w = elements::by_z(*z).map_or(0.0, |e| e.atomic_weight);
                    w * ratio_to_f64(n)
                })
                .sum(),
        }
    }

    /// The count of element `z` (zero when absent).
    pub fn count(&self, z: u8) -> Ratio<i64> {
        self.composition
            .binary_search_by_key(&z, |(e, _)| *e)
            .map_or_else(|_| Ratio::zero(), |i| self.composition[i].1)
    }

    /// True for a neutral species made of one element (`O2`, `Fe`, `S8`):
    /// the candidates for an element in its reference state.
    pub fn is_element_only(&self) -> bool {
        self.kind == SpeciesKind::Compound && self.composition.len() == 1 && self.charge == 0
    }

    /// The formula in Hill order (C, then H, then the rest alphabetically;
    /// alphabetically throughout when there is no carbon) with the charge
    /// in the unambiguous `^` form: `C2H6O`, `O4S^2-`, `H4N^+`, `CuH10O9S`.
    pub fn hill(&self) -> String {
        match self.kind {
            SpeciesKind::Electron => return "e-".to_string(),
            SpeciesKind::ThirdBody => return "M".to_string(),
            SpeciesKind::Photon => return "hv".to_string(),
            SpeciesKind::Compound => {}
        }
        let mut parts: Vec<(&'static str, Ratio<i64>)> = self
            .composition
            .iter()
            .filter_map(|(z, n)| elements::by_z(*z).map(|e: &Element| (e.symbol, *n)))
            .collect();
        let has_carbon = parts.iter().any(|(s, _)| *s == "C");
        parts.sort_by(|a, b| {
            let rank = |s: &str| match (has_carbon, s) {
                (true, "C") => 0,
                (true, "H") => 1,
                _ => 2,
            };
            (rank(a.0), a.0).cmp(&(rank(b.0), b.0))
        });
        let mut out = String::new();
        for (symbol, n) in parts {
            out.push_str(symbol);
            if !n.is_one() {
                out.push_str(&format_count(&n));
            }
        }
        match self.charge {
            0 => {}
            1 => out.push_str("^+"),
            -1 => out.push_str("^-"),
            q => {
                out.push('^');
                out.push_str(&charge_text(q));
            }
        }
        out
    }
}

/// What went wrong while reading a formula.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum FormulaErrorKind {
    UnknownElement,
    Syntax,
    TooDeep,
    CountOverflow,
}

/// A formula that could not be read, with the byte range at fault.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct FormulaError {
    /// Byte range within the token text, on character boundaries.
    pub span: Range<usize>,
    pub kind: FormulaErrorKind,
    /// What is wrong and what to do, without a trailing period.
    pub message: String,
    /// Whole corrected token texts (`Cl2` for `CL2`), best first.
    pub suggestions: Vec<String>,
}

impl fmt::Display for FormulaError {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.message)
    }
}

impl std::error::Error for FormulaError {}

/// True when `text` should be read as a formula rather than as an alias:
/// it starts with an uppercase letter, `(` or `[`, or is one of the special
/// species `e-`, `e^-`, `e⁻`, `hv`.
pub fn looks_like_formula(text: &str) -> bool {
    match text.as_bytes().first() {
        Some(b) if b.is_ascii_uppercase() || *b == b'(' || *b == b'[' => true,
        _ => electron_phase(text).is_some() || text == "hv" || text == "hν",
    }
}

/// Reads one species token. See the module documentation for the notation.
pub fn parse_formula(text: &str) -> Result<Formula, FormulaError> {
    parse(text, true)
}

fn parse(text: &str, suggest: bool) -> Result<Formula, FormulaError> {
    if let Some(phase) = electron_phase(text) {
        return Ok(Formula::special(SpeciesKind::Electron, -1, phase));
    }
    match text {
        "M" => return Ok(Formula::special(SpeciesKind::ThirdBody, 0, None)),
        "hv" | "hν" => return Ok(Formula::special(SpeciesKind::Photon, 0, None)),
        "" => {
            return Err(err(
                0..0,
                FormulaErrorKind::Syntax,
                "empty formula: write a species such as `H2O`".to_string(),
            ));
        }
        _ => {}
    }
    if let Some(formula) = plain(text) {
        return Ok(formula);
    }
    let mut p = Parser::new(text, suggest);
    p.run()
}

/// Most elements a [`plain`] formula may name before the general reader
/// takes it.
const PLAIN_SYMBOLS: usize = 12;

/// The reading of the most common kind of formula, element symbols with
/// whole ASCII counts and an optional phase tag (`C2H6(g)`, `H2O`), without
/// the general reader's bookkeeping for groups, hydrates, charges and
/// error messages. `None` sends the text to the general reader, which gives
/// the same result on everything this accepts (a property test holds the
/// two together).
fn plain(text: &str) -> Option<Formula> {
    let bytes = text.as_bytes();
    let mut atoms = [(0u8, 0i64); PLAIN_SYMBOLS];
    let mut len = 0;
    let mut i = 0;
    while i < bytes.len() && bytes[i].is_ascii_uppercase() {
        let start = i;
        i += 1;
        if i < bytes.len() && bytes[i].is_ascii_lowercase() {
            i += 1;
        }
        let z = elements::by_symbol(&text[start..i])?.z;
        let mut count: i64 = 1;
        if i < bytes.len() && bytes[i].is_ascii_digit() {
            // A leading zero, a count of zero and long counts are left to
            // the general reader and its messages.
            if bytes[i] == b'0' {
                return None;
            }
            count = 0;
            let digits = i;
            while i < bytes.len() && bytes[i].is_ascii_digit() {
                count = count * 10 + i64::from(bytes[i] - b'0');
                i += 1;
                if i - digits > 9 {
                    return None;
                }
            }
        }
        if len == PLAIN_SYMBOLS {
            return None;
        }
        atoms[len] = (z, count);
        len += 1;
    }
    if len == 0 {
        return None;
    }
    let phase = match &text[i..] {
        "" => None,
        rest => Some(Phase::from_tag(rest.strip_prefix('(')?.strip_suffix(')')?)?),
    };
    let atoms = &mut atoms[..len];
    atoms.sort_unstable_by_key(|(z, _)| *z);
    let mut composition: Vec<(u8, Ratio<i64>)> = Vec::with_capacity(len);
    for &(z, n) in atoms.iter() {
        match composition.last_mut() {
            Some((lz, ln)) if *lz == z => *ln = Ratio::from_integer(ln.numer() + n),
            _ => composition.push((z, Ratio::from_integer(n))),
        }
    }
    Some(Formula {
        kind: SpeciesKind::Compound,
        composition,
        charge: 0,
        phase,
        reading_note: None,
    })
}

/// The phase of an electron token (`e-`, `e^-`, `e⁻`, each optionally with a
/// phase tag), or `None` when `text` is not an electron.
fn electron_phase(text: &str) -> Option<Option<Phase>> {
    for spelling in ["e-", "e^-", "e⁻"] {
        if let Some(rest) = text.strip_prefix(spelling) {
            if rest.is_empty() {
                return Some(None);
            }
            let tag = rest.strip_prefix('(')?.strip_suffix(')')?;
            return Phase::from_tag(tag).map(Some);
        }
    }
    None
}

fn err(span: Range<usize>, kind: FormulaErrorKind, message: String) -> FormulaError {
    FormulaError {
        span,
        kind,
        message,
        suggestions: Vec::new(),
    }
}

/// A count just read, remembered for the readings of a bare trailing sign.
#[derive(Clone)]
struct CountInfo {
    span: Range<usize>,
    value: i64,
    ascii: bool,
    after_group: bool,
}

/// What a count that follows would multiply.
#[derive(Clone, Copy, PartialEq)]
enum Last {
    /// Nothing countable (start, after `(`, after a dot).
    Nothing,
    /// The atoms from this index of `atoms` (one element or a closed group).
    Unit { at: usize, group: bool },
    /// A count was just read.
    Counted,
}

struct Open {
    close: char,
    open_at: usize,
    atoms_at: usize,
}

struct Parser<'a> {
    text: &'a str,
    suggest: bool,
    pos: usize,
    atoms: Vec<(u8, Ratio<i64>)>,
    open: Vec<Open>,
    part_start: usize,
    part_symbols: usize,
    part_mult: Ratio<i64>,
    part_mult_span: Range<usize>,
    last: Last,
    last_count: Option<CountInfo>,
    /// The previous element symbol when it was one letter ending here.
    prev_single: Option<(usize, char)>,
    symbols: usize,
    any_group: bool,
    any_dot: bool,
    charge: i64,
    phase: Option<Phase>,
    note: Option<String>,
}

fn is_subscript(c: char) -> bool {
    ('₀'..='₉').contains(&c)
}

fn superscript_digit(c: char) -> Option<u32> {
    match c {
        '⁰' => Some(0),
        '¹' => Some(1),
        '²' => Some(2),
        '³' => Some(3),
        '⁴'..='⁹' => Some(c as u32 - '⁴' as u32 + 4),
        _ => None,
    }
}

fn is_superscript(c: char) -> bool {
    superscript_digit(c).is_some() || c == '⁺' || c == '⁻'
}

impl<'a> Parser<'a> {
    fn new(text: &'a str, suggest: bool) -> Self {
        Parser {
            text,
            suggest,
            pos: 0,
            atoms: Vec::with_capacity(8),
            open: Vec::new(),
            part_start: 0,
            part_symbols: 0,
            part_mult: Ratio::one(),
            part_mult_span: 0..0,
            last: Last::Nothing,
            last_count: None,
            prev_single: None,
            symbols: 0,
            any_group: false,
            any_dot: false,
            charge: 0,
            phase: None,
            note: None,
        }
    }

    fn peek(&self) -> Option<char> {
        self.text[self.pos..].chars().next()
    }

    fn peek_at(&self, at: usize) -> Option<char> {
        self.text.get(at..).and_then(|s| s.chars().next())
    }

    fn char_span(&self, at: usize) -> Range<usize> {
        let len = self.peek_at(at).map_or(0, char::len_utf8);
        at..at + len
    }

    /// A corrected text, kept only when it reads without error.
    fn candidate(&self, fixed: String) -> Option<String> {
        (self.suggest && fixed != self.text && parse(&fixed, false).is_ok()).then_some(fixed)
    }

    fn replace(&self, span: &Range<usize>, with: &str) -> String {
        let mut s = String::with_capacity(self.text.len() + with.len());
        s.push_str(&self.text[..span.start]);
        s.push_str(with);
        s.push_str(&self.text[span.end..]);
        s
    }

    fn syntax(&self, span: Range<usize>, message: String) -> FormulaError {
        err(span, FormulaErrorKind::Syntax, message)
    }

    fn with_fix(&self, mut e: FormulaError, fixed: String) -> FormulaError {
        if let Some(s) = self.candidate(fixed).filter(|s| !e.suggestions.contains(s)) {
            e.suggestions.push(s);
        }
        e
    }

    fn run(&mut self) -> Result<Formula, FormulaError> {
        self.body()?;
        if let Some(o) = self.open.last() {
            let what = if o.close == ')' { '(' } else { '[' };
            let e = self.syntax(
                o.open_at..o.open_at + 1,
                format!("`{what}` is never closed: add `{}`", o.close),
            );
            let fixed = match self.peek() {
                None => format!("{}{}", self.text, o.close),
                Some(_) => self.replace(&(self.pos..self.pos), &o.close.to_string()),
            };
            return Err(self.with_fix(e, fixed));
        }
        self.end_part()?;
        if self.symbols == 0 {
            let span = self.char_span(0);
            return Err(self.syntax(
                span,
                "no element symbol before the charge or phase: write the formula first, as in `Fe^3+`"
                    .to_string(),
            ));
        }
        if self.peek().is_some_and(|c| c != '(') {
            self.charge()?;
        }
        if let Some(c) = self.peek() {
            if c == '(' {
                self.phase_tag()?;
            } else {
                let span = self.char_span(self.pos);
                return Err(self.syntax(
                    span,
                    format!("unexpected `{c}` after the charge: the charge comes last, followed only by an optional phase tag such as `(aq)`"),
                ));
            }
        }
        self.composition()
    }

    /// Element symbols, counts, groups and hydrate dots, up to a charge, a
    /// phase tag or the end.
    fn body(&mut self) -> Result<(), FormulaError> {
        while let Some(c) = self.peek() {
            match c {
                'A'..='Z' => self.element()?,
                '(' | '[' => {
                    let next = self.peek_at(self.pos + 1);
                    if c == '(' && next.is_some_and(|n| n.is_ascii_lowercase()) {
                        return Ok(());
                    }
                    self.open_group(c)?;
                }
                ')' | ']' => self.close_group(c)?,
                '0'..='9' => self.count(true)?,
                _ if is_subscript(c) => self.count(false)?,
                '·' | '*' => self.dot()?,
                '^' | '+' | '-' => return Ok(()),
                _ if is_superscript(c) => return Ok(()),
                'a'..='z' => return Err(self.lowercase(c)),
                '.' | '•' | '∙' | '⋅' => {
                    let span = self.char_span(self.pos);
                    let e = self.syntax(
                        span.clone(),
                        format!("`{c}` is not a hydrate dot: join the parts with `·` or `*`"),
                    );
                    return Err(self.with_fix(e, self.replace(&span, "·")));
                }
                '−' | '–' => {
                    let span = self.char_span(self.pos);
                    let e = self.syntax(
                        span.clone(),
                        format!("`{c}` is not a minus sign here: write the charge sign as `-`"),
                    );
                    return Err(self.with_fix(e, self.replace(&span, "-")));
                }
                _ => {
                    let span = self.char_span(self.pos);
                    return Err(self.syntax(
                        span,
                        format!(
                            "unexpected `{}` in a formula: write element symbols, counts, `()` or `[]` groups, a charge and a phase tag",
                            c.escape_debug()
                        ),
                    ));
                }
            }
        }
        Ok(())
    }

    fn lowercase(&self, c: char) -> FormulaError {
        let span = self.char_span(self.pos);
        if self.pos == 0 {
            let e = self.syntax(
                span,
                "a formula starts with an uppercase element symbol or a bracket: capitalise the symbol, or declare the name as a species alias".to_string(),
            );
            let upper = self.text.to_uppercase();
            let e = self.with_fix(e, upper);
            let fixed = format!("{}{}", c.to_ascii_uppercase(), &self.text[1..]);
            return self.with_fix(e, fixed);
        }
        self.syntax(
            span,
            format!("unexpected lowercase `{c}`: element symbols start with an uppercase letter and have at most one lowercase letter"),
        )
    }

    fn element(&mut self) -> Result<(), FormulaError> {
        let start = self.pos;
        let mut end = start + 1;
        if self
            .text
            .as_bytes()
            .get(end)
            .is_some_and(u8::is_ascii_lowercase)
        {
            end += 1;
        }
        let symbol = &self.text[start..end];
        let Some(e) = elements::by_symbol(symbol) else {
            return Err(self.unknown_element(start..end));
        };
        self.prev_single =
            (end == start + 1).then(|| (start, symbol.chars().next().unwrap_or('?')));
        self.atoms.push((e.z, Ratio::one()));
        self.last = Last::Unit {
            at: self.atoms.len() - 1,
            group: false,
        };
        self.last_count = None;
        self.symbols += 1;
        self.part_symbols += 1;
        self.pos = end;
        Ok(())
    }

    fn unknown_element(&self, span: Range<usize>) -> FormulaError {
        let symbol = &self.text[span.clone()];
        // `CL`: one uppercase letter right after a one-letter symbol may be
        // the second letter of a two-letter symbol typed in capitals.
        let mut merged = None;
        if let Some((at, first)) = self.prev_single
            && at + 1 == span.start
            && symbol.len() == 1
        {
            let both = format!("{first}{symbol}");
            let s = elements::suggest(&both);
            if !s.is_empty() {
                merged = Some((at..span.end, both, s));
            }
        }
        let (span, written, candidates) =
            merged.unwrap_or_else(|| (span.clone(), symbol.to_string(), elements::suggest(symbol)));
        let mut suggestions: Vec<String> = Vec::new();
        for c in &candidates {
            if let Some(s) = self.candidate(self.replace(&span, c))
                && !suggestions.contains(&s)
            {
                suggestions.push(s);
            }
            if suggestions.len() == 3 {
                break;
            }
        }
        let message = match candidates.first() {
            Some(best) if best.eq_ignore_ascii_case(&written) => format!(
                "unknown element `{written}`: write `{best}` (element symbols are case-sensitive)"
            ),
            Some(best) => {
                format!("unknown element `{written}`: write a known symbol such as `{best}`")
            }
            None => format!(
                "unknown element `{written}`: write an element symbol from the periodic table"
            ),
        };
        FormulaError {
            span,
            kind: FormulaErrorKind::UnknownElement,
            message,
            suggestions,
        }
    }

    fn open_group(&mut self, c: char) -> Result<(), FormulaError> {
        if self.open.len() >= MAX_DEPTH {
            return Err(err(
                self.pos..self.pos + 1,
                FormulaErrorKind::TooDeep,
                format!("groups nested deeper than {MAX_DEPTH} levels: flatten the formula"),
            ));
        }
        self.open.push(Open {
            close: if c == '(' { ')' } else { ']' },
            open_at: self.pos,
            atoms_at: self.atoms.len(),
        });
        self.any_group = true;
        self.last = Last::Nothing;
        self.last_count = None;
        self.prev_single = None;
        self.pos += 1;
        Ok(())
    }

    fn close_group(&mut self, c: char) -> Result<(), FormulaError> {
        let here = self.pos..self.pos + 1;
        let Some(open) = self.open.pop() else {
            let e = self.syntax(
                here.clone(),
                format!("`{c}` closes no group: remove it or add the opening bracket"),
            );
            return Err(self.with_fix(e, self.replace(&here, "")));
        };
        if open.close != c {
            let e = self.syntax(
                here.clone(),
                format!(
                    "`{c}` does not match the bracket opened at byte {}: write `{}`",
                    open.open_at, open.close
                ),
            );
            return Err(self.with_fix(e, self.replace(&here, &open.close.to_string())));
        }
        if self.atoms.len() == open.atoms_at {
            let span = open.open_at..self.pos + 1;
            let e = self.syntax(span.clone(), "empty group: remove the brackets".to_string());
            return Err(self.with_fix(e, self.replace(&span, "")));
        }
        self.last = Last::Unit {
            at: open.atoms_at,
            group: true,
        };
        self.last_count = None;
        self.prev_single = None;
        self.pos += 1;
        Ok(())
    }

    /// Reads a run of ASCII digits (or of subscript digits) as an i64.
    fn digits(&mut self, ascii: bool) -> Result<(i64, Range<usize>), FormulaError> {
        let start = self.pos;
        let mut value: Option<i64> = Some(0);
        while let Some(c) = self.peek() {
            let d = if ascii && c.is_ascii_digit() {
                c as i64 - '0' as i64
            } else if !ascii && is_subscript(c) {
                c as i64 - '₀' as i64
            } else {
                break;
            };
            value = value
                .and_then(|v| v.checked_mul(10))
                .and_then(|v| v.checked_add(d));
            self.pos += c.len_utf8();
        }
        let span = start..self.pos;
        match value {
            Some(v) => Ok((v, span)),
            None => Err(err(
                span,
                FormulaErrorKind::CountOverflow,
                "number too large: counts and charges must fit in 64 bits".to_string(),
            )),
        }
    }

    fn count(&mut self, ascii: bool) -> Result<(), FormulaError> {
        let start = self.pos;
        let (value, span) = self.digits(ascii)?;
        let (at, group) = match self.last {
            Last::Unit { at, group } => (at, group),
            Last::Nothing if start == 0 => {
                return Err(self.syntax(
                    span,
                    "a formula starts with an element symbol or a bracket: put a space between a coefficient and its species".to_string(),
                ));
            }
            Last::Nothing => {
                return Err(self.syntax(
                    span,
                    "a count must follow an element symbol or a closing bracket".to_string(),
                ));
            }
            Last::Counted => {
                return Err(self.syntax(
                    span,
                    "two counts in a row: write one count per element or group".to_string(),
                ));
            }
        };
        if value == 0 {
            return Err(self.syntax(
                span,
                "a count of zero: remove the element or group, or write a positive count"
                    .to_string(),
            ));
        }
        let factor = Ratio::from_integer(value);
        for (_, n) in &mut self.atoms[at..] {
            // Whole counts, nearly all of them, multiply without the
            // reductions a general product of fractions needs.
            let product = if n.is_integer() {
                i64::checked_mul(*n.numer(), value).map(Ratio::from_integer)
            } else {
                n.checked_mul(&factor)
            };
            *n = product.ok_or_else(|| {
                err(
                    span.clone(),
                    FormulaErrorKind::CountOverflow,
                    "count too large: the product of nested counts must fit in 64 bits".to_string(),
                )
            })?;
        }
        self.last = Last::Counted;
        self.last_count = Some(CountInfo {
            span,
            value,
            ascii,
            after_group: group,
        });
        self.prev_single = None;
        Ok(())
    }

    fn dot(&mut self) -> Result<(), FormulaError> {
        let dot = self.char_span(self.pos);
        if !self.open.is_empty() {
            return Err(self.syntax(
                dot,
                "a hydrate dot inside a group: close the group before `·`".to_string(),
            ));
        }
        if self.part_symbols == 0 {
            return Err(self.syntax(
                dot,
                "nothing before the hydrate dot: write a formula on both sides of `·`".to_string(),
            ));
        }
        self.end_part()?;
        self.pos = dot.end;
        self.any_dot = true;
        self.part_start = self.atoms.len();
        self.part_symbols = 0;
        self.part_mult = Ratio::one();
        self.last = Last::Nothing;
        self.last_count = None;
        self.prev_single = None;
        let start = self.pos;
        if self.peek().is_some_and(|c| c.is_ascii_digit()) {
            let (whole, _) = self.digits(true)?;
            let mut mult = Ratio::from_integer(whole);
            if self.peek() == Some('.')
                && self
                    .peek_at(self.pos + 1)
                    .is_some_and(|c| c.is_ascii_digit())
            {
                self.pos += 1;
                let frac_start = self.pos;
                let (frac, _) = self.digits(true)?;
                let places = u32::try_from(self.pos - frac_start).unwrap_or(u32::MAX);
                let denom = 10i64.checked_pow(places).ok_or_else(|| {
                    err(
                        start..self.pos,
                        FormulaErrorKind::CountOverflow,
                        "too many decimal places in the multiplier: write at most 18".to_string(),
                    )
                })?;
                mult = whole
                    .checked_mul(denom)
                    .and_then(|w| w.checked_add(frac))
                    .map(|n| Ratio::new(n, denom))
                    .ok_or_else(|| {
                        err(
                            start..self.pos,
                            FormulaErrorKind::CountOverflow,
                            "multiplier too large: it must fit in 64 bits".to_string(),
                        )
                    })?;
            }
            if mult.is_zero() {
                return Err(self.syntax(
                    start..self.pos,
                    "a multiplier of zero: remove the part or write a positive multiplier"
                        .to_string(),
                ));
            }
            self.part_mult = mult;
            self.part_mult_span = start..self.pos;
        }
        if self
            .peek()
            .is_none_or(|c| !(c.is_ascii_uppercase() || c == '(' || c == '['))
        {
            let span = if self.pos > start {
                start..self.pos
            } else {
                dot
            };
            return Err(self.syntax(
                span,
                "a hydrate dot must be followed by a formula, as in `CuSO4·5H2O`".to_string(),
            ));
        }
        Ok(())
    }

    fn end_part(&mut self) -> Result<(), FormulaError> {
        if self.part_mult.is_one() {
            return Ok(());
        }
        let mult = self.part_mult;
        for (_, n) in &mut self.atoms[self.part_start..] {
            *n = n.checked_mul(&mult).ok_or_else(|| {
                err(
                    self.part_mult_span.clone(),
                    FormulaErrorKind::CountOverflow,
                    "count too large: the multiplied counts must fit in 64 bits".to_string(),
                )
            })?;
        }
        self.part_mult = Ratio::one();
        Ok(())
    }

    fn charge(&mut self) -> Result<(), FormulaError> {
        let start = self.pos;
        let Some(c) = self.peek() else { return Ok(()) };
        let body_end = start;
        if c == '^' {
            self.pos += 1;
            let (mag, mag_span) = if self.peek().is_some_and(|c| c.is_ascii_digit()) {
                let (v, s) = self.digits(true)?;
                (Some(v), s)
            } else {
                (None, self.pos..self.pos)
            };
            let sign = match self.peek() {
                Some('+') => 1,
                Some('-') => -1,
                _ => {
                    let span = start..self.pos;
                    return Err(self.syntax(
                        span,
                        "after `^` write the charge as magnitude then sign, as in `^2+` or `^-`"
                            .to_string(),
                    ));
                }
            };
            self.pos += 1;
            if mag.is_none() && self.peek().is_some_and(|c| c.is_ascii_digit()) {
                let (v, s) = self.digits(true)?;
                let sign_text = if sign > 0 { "+" } else { "-" };
                let e = self.syntax(
                    start..s.end,
                    format!(
                        "after `^` the magnitude comes before the sign: write `^{v}{sign_text}`"
                    ),
                );
                return Err(self.with_fix(
                    e,
                    self.replace(&(start..s.end), &format!("^{v}{sign_text}")),
                ));
            }
            if mag == Some(0) {
                return Err(
                    self.syntax(mag_span, "a charge of zero: remove the charge".to_string())
                );
            }
            self.charge = sign * mag.unwrap_or(1);
            return Ok(());
        }
        if c == '+' || c == '-' {
            let sign: i64 = if c == '+' { 1 } else { -1 };
            self.pos += 1;
            let mut repeats = 1;
            while self.peek() == Some(c) {
                repeats += 1;
                self.pos += 1;
            }
            if repeats > 1 {
                let e = self.syntax(
                    start..self.pos,
                    format!("repeated `{c}` signs: write the charge as `^{repeats}{c}`"),
                );
                return Err(self.with_fix(
                    e,
                    self.replace(&(start..self.pos), &format!("^{repeats}{c}")),
                ));
            }
            if self.peek().is_some_and(|c| c.is_ascii_digit()) {
                let (v, s) = self.digits(true)?;
                if v == 0 {
                    return Err(self.syntax(s, "a charge of zero: remove the charge".to_string()));
                }
                self.charge = sign * v;
                return Ok(());
            }
            self.bare_sign(sign, body_end);
            return Ok(());
        }
        // Superscript digits then a superscript sign.
        let mut mag: Option<i64> = None;
        while let Some(d) = self.peek().and_then(superscript_digit) {
            mag = Some(
                mag.unwrap_or(0)
                    .checked_mul(10)
                    .and_then(|m| m.checked_add(i64::from(d)))
                    .ok_or_else(|| {
                        err(
                            start..self.pos,
                            FormulaErrorKind::CountOverflow,
                            "charge too large: it must fit in 64 bits".to_string(),
                        )
                    })?,
            );
            self.pos += self.peek().map_or(1, char::len_utf8);
        }
        let sign = match self.peek() {
            Some('⁺') => 1,
            Some('⁻') => -1,
            Some(s @ ('+' | '-')) => {
                let fixed = format!("^{}{s}", mag.unwrap_or(1));
                let span = start..self.pos + 1;
                let e = self.syntax(
                    span.clone(),
                    format!(
                        "superscript digits need a superscript sign: write `{}` or `{fixed}`",
                        if s == '+' { '⁺' } else { '⁻' }
                    ),
                );
                return Err(self.with_fix(e, self.replace(&span, &fixed)));
            }
            _ => {
                let span = start..self.pos;
                return Err(self.syntax(
                    span,
                    "a superscript charge needs a sign: end it with `⁺` or `⁻`".to_string(),
                ));
            }
        };
        self.pos += '⁺'.len_utf8();
        if mag.is_none() && self.peek().and_then(superscript_digit).is_some() {
            let digits_start = self.pos;
            while self.peek().and_then(superscript_digit).is_some() {
                self.pos += self.peek().map_or(1, char::len_utf8);
            }
            let digits = &self.text[digits_start..self.pos];
            let sign_char = if sign > 0 { '⁺' } else { '⁻' };
            let e = self.syntax(
                start..self.pos,
                format!("the charge magnitude comes before the sign: write `{digits}{sign_char}`"),
            );
            return Err(self.with_fix(
                e,
                self.replace(&(start..self.pos), &format!("{digits}{sign_char}")),
            ));
        }
        if mag == Some(0) {
            return Err(self.syntax(
                start..self.pos,
                "a charge of zero: remove the charge".to_string(),
            ));
        }
        self.charge = sign * mag.unwrap_or(1);
        Ok(())
    }

    /// A trailing `+` or `-` with no magnitude: ±1, except for the
    /// monatomic-ion shorthand (`Fe3+`). Notes the plausible other reading.
    fn bare_sign(&mut self, sign: i64, body_end: usize) {
        self.charge = sign;
        let sign_text = if sign > 0 { "+" } else { "-" };
        let Some(count) = self.last_count.clone().filter(|c| c.ascii) else {
            return;
        };
        let written = &self.text[..self.pos];
        let monatomic =
            self.symbols == 1 && !self.any_group && !self.any_dot && self.atoms.len() == 1;
        if monatomic {
            let (z, _) = self.atoms[0];
            self.atoms[0].1 = Ratio::one();
            self.charge = sign * count.value;
            let symbol = elements::by_z(z).map_or("?", |e| e.symbol);
            if (count.value == 2 && DIATOMIC_IONS.contains(&z)) || count.value >= 9 {
                let other = format!("{}^{sign_text}", &self.text[..body_end]);
                self.note = Some(format!(
                    "read `{written}` by the monatomic-ion shorthand as {symbol} with charge {}; for {} with charge 1{sign_text} write `{other}`",
                    charge_text(self.charge),
                    &self.text[..body_end],
                ));
            }
            return;
        }
        let digits = &self.text[count.span.clone()];
        if digits.len() < 2 && !count.after_group {
            return;
        }
        let body = &self.text[..body_end];
        let (keep, last) = digits.split_at(digits.len() - 1);
        let alternative = if last == "0" {
            format!("write `{body}^{sign_text}` to confirm this reading")
        } else {
            let before = &self.text[..count.span.start];
            let mag = if last == "1" { "" } else { last };
            format!(
                "for {before}{keep} with charge {last}{sign_text} write `{before}{keep}^{mag}{sign_text}`"
            )
        };
        self.note = Some(format!(
            "read `{written}` as {body} with charge 1{sign_text}; {alternative}"
        ));
    }

    fn phase_tag(&mut self) -> Result<(), FormulaError> {
        let start = self.pos;
        let inner_start = start + 1;
        let close = self.text[inner_start..].find(')').map(|i| inner_start + i);
        let Some(close) = close else {
            let span = self.char_span(start);
            return Err(self.syntax(span, "phase tag is never closed: add `)`".to_string()));
        };
        let tag = &self.text[inner_start..close];
        let Some(phase) = Phase::from_tag(tag) else {
            return Err(self.syntax(
                start..close + 1,
                format!(
                    "unknown phase tag `({})`: write `(g)`, `(l)`, `(s)` or `(aq)`",
                    tag.escape_debug()
                ),
            ));
        };
        self.pos = close + 1;
        if self.pos < self.text.len() {
            let rest = &self.text[self.pos..];
            let e = self.syntax(
                start..self.pos,
                "the phase tag must come last, after the formula and its charge".to_string(),
            );
            let fixed = format!(
                "{}{rest}{}",
                &self.text[..start],
                &self.text[start..self.pos]
            );
            return Err(self.with_fix(e, fixed));
        }
        self.phase = Some(phase);
        Ok(())
    }

    fn composition(&mut self) -> Result<Formula, FormulaError> {
        let mut atoms = std::mem::take(&mut self.atoms);
        atoms.sort_unstable_by_key(|(z, _)| *z);
        let mut merged: Vec<(u8, Ratio<i64>)> = Vec::with_capacity(atoms.len());
        for (z, n) in atoms {
            match merged.last_mut() {
                Some((lz, ln)) if *lz == z => {
                    *ln = ln.checked_add(&n).ok_or_else(|| {
                        err(
                            0..self.text.len(),
                            FormulaErrorKind::CountOverflow,
                            "count too large: the total count of an element must fit in 64 bits"
                                .to_string(),
                        )
                    })?;
                }
                _ => merged.push((z, n)),
            }
        }
        Ok(Formula {
            kind: SpeciesKind::Compound,
            composition: merged,
            charge: self.charge,
            phase: self.phase,
            reading_note: self.note.take(),
        })
    }
}

fn ratio_to_f64(r: &Ratio<i64>) -> f64 {
    r.numer().to_f64().unwrap_or(f64::NAN) / r.denom().to_f64().unwrap_or(f64::NAN)
}

/// `2`, `0.5`, or `1/3` when the decimal does not terminate.
fn format_count(n: &Ratio<i64>) -> String {
    if n.is_integer() {
        return n.numer().to_string();
    }
    let mut d = *n.denom();
    while d % 2 == 0 {
        d /= 2;
    }
    while d % 5 == 0 {
        d /= 5;
    }
    if d == 1 {
        let mut s = format!("{}", ratio_to_f64(n));
        if s.contains('e') {
            s = format!("{}/{}", n.numer(), n.denom());
        }
        s
    } else {
        format!("({}/{})", n.numer(), n.denom())
    }
}

/// `2+`, `1-`: magnitude then sign.
pub fn charge_text(charge: i64) -> String {
    let sign = if charge < 0 { '-' } else { '+' };
    format!("{}{sign}", charge.unsigned_abs())
}

#[cfg(test)]
mod tests {
    use super::*;
    use proptest::prelude::*;

    fn ok(text: &str) -> Formula {
        match parse_formula(text) {
            Ok(f) => f,
            Err(e) => panic!("{text}: {e:?}"),
        }
    }

    fn bad(text: &str) -> FormulaError {
        match parse_formula(text) {
            Ok(f) => panic!("{text} parsed as {f:?}"),
            Err(e) => e,
        }
    }

    /// Composition as (symbol, numerator, denominator), for readable tests.
    fn comp(f: &Formula) -> Vec<(&'static str, i64, i64)> {
        f.composition
            .iter()
            .map(|(z, n)| {
                (
                    elements::by_z(*z).map_or("?", |e| e.symbol),
                    *n.numer(),
                    *n.denom(),
                )
            })
            .collect()
    }

    fn ints(pairs: &[(&'static str, i64)]) -> Vec<(&'static str, i64, i64)> {
        let mut v: Vec<_> = pairs.iter().map(|&(s, n)| (s, n, 1)).collect();
        v.sort_by_key(|(s, _, _)| elements::by_symbol(s).map_or(0, |e| e.z));
        v
    }

    #[test]
    fn plain_formulas_and_case() {
        assert_eq!(comp(&ok("H2O")), ints(&[("H", 2), ("O", 1)]));
        assert_eq!(comp(&ok("Co")), ints(&[("Co", 1)]));
        assert_eq!(comp(&ok("CO")), ints(&[("C", 1), ("O", 1)]));
        assert_eq!(comp(&ok("C2H5OH")), ints(&[("C", 2), ("H", 6), ("O", 1)]));
        assert_eq!(ok("H2O").charge, 0);
        assert_eq!(ok("H2O").kind, SpeciesKind::Compound);
    }

    #[test]
    fn nested_groups() {
        assert_eq!(
            comp(&ok("Ca3(PO4)2")),
            ints(&[("Ca", 3), ("P", 2), ("O", 8)])
        );
        assert_eq!(
            comp(&ok("K4[Fe(CN)6]")),
            ints(&[("K", 4), ("Fe", 1), ("C", 6), ("N", 6)])
        );
        assert_eq!(
            comp(&ok("(NH4)2SO4")),
            ints(&[("N", 2), ("H", 8), ("S", 1), ("O", 4)])
        );
        assert_eq!(
            comp(&ok("[Co(NH3)6]Cl3")),
            ints(&[("Co", 1), ("N", 6), ("H", 18), ("Cl", 3)])
        );
        assert_eq!(
            comp(&ok("((CH3)3C)2O")),
            ints(&[("C", 8), ("H", 18), ("O", 1)])
        );
    }

    #[test]
    fn hydrates_and_adducts() {
        let want = ints(&[("Cu", 1), ("S", 1), ("O", 9), ("H", 10)]);
        assert_eq!(comp(&ok("CuSO4·5H2O")), want);
        assert_eq!(comp(&ok("CuSO4*5H2O")), want);
        let half = ok("CaSO4·0.5H2O");
        assert_eq!(
            comp(&half),
            vec![("H", 1, 1), ("O", 9, 2), ("S", 1, 1), ("Ca", 1, 1)]
        );
        assert_eq!(
            comp(&ok("Na2CO3·H2O")),
            ints(&[("Na", 2), ("C", 1), ("O", 4), ("H", 2)])
        );
        assert_eq!(
            comp(&ok("AlCl3·6H2O·2NH3")),
            ints(&[("Al", 1), ("Cl", 3), ("O", 6), ("H", 18), ("N", 2)])
        );
        assert_eq!(
            comp(&ok("CaSO4·1.25H2O")),
            vec![("H", 5, 2), ("O", 21, 4), ("S", 1, 1), ("Ca", 1, 1)]
        );
    }

    #[test]
    fn caret_charges() {
        assert_eq!(ok("Fe^3+").charge, 3);
        assert_eq!(ok("SO4^2-").charge, -2);
        assert_eq!(comp(&ok("SO4^2-")), ints(&[("O", 4), ("S", 1)]));
        assert_eq!(ok("NH4^+").charge, 1);
        assert_eq!(ok("Hg2^2+").charge, 2);
        assert_eq!(comp(&ok("Hg2^2+")), ints(&[("Hg", 2)]));
        assert_eq!(ok("O2^-").charge, -1);
        assert_eq!(comp(&ok("O2^-")), ints(&[("O", 2)]));
        assert_eq!(ok("[Fe(CN)6]^4-").charge, -4);
        assert!(ok("SO4^2-").reading_note.is_none());
    }

    #[test]
    fn trailing_sign_charges() {
        assert_eq!(ok("Fe+3").charge, 3);
        assert_eq!(comp(&ok("Fe+3")), ints(&[("Fe", 1)]));
        assert_eq!(ok("SO4-2").charge, -2);
        assert_eq!(comp(&ok("SO4-2")), ints(&[("S", 1), ("O", 4)]));
        let ammonium = ok("NH4+");
        assert_eq!(
            (ammonium.charge, comp(&ammonium)),
            (1, ints(&[("N", 1), ("H", 4)]))
        );
        let nitrate = ok("NO3-");
        assert_eq!(
            (nitrate.charge, comp(&nitrate)),
            (-1, ints(&[("N", 1), ("O", 3)]))
        );
        assert_eq!(ok("Cl-").charge, -1);
        assert_eq!(ok("Na+").charge, 1);
        assert!(ok("NH4+").reading_note.is_none());
        assert!(ok("Cl-").reading_note.is_none());
    }

    #[test]
    fn monatomic_shorthand() {
        let iron = ok("Fe3+");
        assert_eq!((iron.charge, comp(&iron)), (3, ints(&[("Fe", 1)])));
        assert_eq!(ok("Cu2+").charge, 2);
        assert_eq!(comp(&ok("Cu2+")), ints(&[("Cu", 1)]));
        let oxide = ok("O2-");
        assert_eq!((oxide.charge, comp(&oxide)), (-2, ints(&[("O", 1)])));
        // The shorthand for O2- is noted because superoxide is plausible.
        let note = oxide.reading_note.unwrap_or_default();
        assert!(note.contains("`O2^-`"), "{note}");
        // Iron has no common diatomic ion, so no note.
        assert!(iron.reading_note.is_none());
        let mercury = ok("Hg2+");
        assert_eq!((mercury.charge, comp(&mercury)), (2, ints(&[("Hg", 1)])));
        assert!(mercury.reading_note.is_some());
        // Subscript counts are always counts.
        let dimer = ok("Hg₂²⁺");
        assert_eq!((dimer.charge, comp(&dimer)), (2, ints(&[("Hg", 2)])));
        // A large shorthand charge is implausible and noted.
        assert!(ok("Fe12+").reading_note.is_some());
        assert_eq!(ok("Fe12+").charge, 12);
    }

    #[test]
    fn ambiguous_multidigit_count_gets_a_note() {
        let f = ok("SO42-");
        assert_eq!((f.charge, comp(&f)), (-1, ints(&[("O", 42), ("S", 1)])));
        let note = f.reading_note.unwrap_or_default();
        assert!(note.contains("SO42 with charge 1-"), "{note}");
        assert!(note.contains("`SO4^2-`"), "{note}");
        let g = ok("[Fe(CN)6]4-");
        assert_eq!(g.charge, -1);
        assert!(
            g.reading_note
                .unwrap_or_default()
                .contains("`[Fe(CN)6]^4-`")
        );
        let h = ok("C2H10-");
        assert!(h.reading_note.unwrap_or_default().contains("`C2H10^-`"));
    }

    #[test]
    fn unicode_subscripts_and_superscripts() {
        let cu = ok("Cu²⁺");
        assert_eq!((cu.charge, comp(&cu)), (2, ints(&[("Cu", 1)])));
        let sulfate = ok("SO₄²⁻");
        assert_eq!(
            (sulfate.charge, comp(&sulfate)),
            (-2, ints(&[("S", 1), ("O", 4)]))
        );
        let ammonium = ok("NH₄⁺");
        assert_eq!(
            (ammonium.charge, comp(&ammonium)),
            (1, ints(&[("N", 1), ("H", 4)]))
        );
        assert_eq!(
            comp(&ok("C₁₂H₂₂O₁₁")),
            ints(&[("C", 12), ("H", 22), ("O", 11)])
        );
        assert_eq!(ok("PO₄³⁻").charge, -3);
        assert_eq!(ok("Fe¹⁰⁺").charge, 10);
        assert!(ok("SO₄²⁻").reading_note.is_none());
    }

    #[test]
    fn phases() {
        assert_eq!(ok("H2O(l)").phase, Some(Phase::Liquid));
        assert_eq!(ok("CO2(g)").phase, Some(Phase::Gas));
        assert_eq!(ok("NaCl(s)").phase, Some(Phase::Solid));
        let f = ok("Fe3+(aq)");
        assert_eq!((f.phase, f.charge), (Some(Phase::Aqueous), 3));
        assert_eq!(ok("SO₄²⁻(aq)").charge, -2);
        assert_eq!(ok("Ca3(PO4)2(s)").count(8), Ratio::from_integer(8));
        assert_eq!(ok("H2O").phase, None);
        for p in [Phase::Gas, Phase::Liquid, Phase::Solid, Phase::Aqueous] {
            assert_eq!(Phase::from_tag(p.tag()), Some(p));
        }
    }

    #[test]
    fn special_species() {
        for e in ["e-", "e^-", "e⁻"] {
            let f = ok(e);
            assert_eq!((f.kind, f.charge), (SpeciesKind::Electron, -1));
            assert!(f.composition.is_empty());
        }
        assert_eq!(ok("e-(aq)").phase, Some(Phase::Aqueous));
        assert_eq!(ok("M").kind, SpeciesKind::ThirdBody);
        assert_eq!(ok("hv").kind, SpeciesKind::Photon);
        assert_eq!(ok("hv").charge, 0);
        assert_eq!(bad("e").kind, FormulaErrorKind::Syntax);
    }

    #[test]
    fn looks_like_formula_separates_aliases() {
        for t in ["H2O", "(NH4)2SO4", "[Fe(CN)6]^4-", "e-", "hv", "M", "CO"] {
            assert!(looks_like_formula(t), "{t}");
        }
        for t in ["ethanol", "glucose", "but1", "isoA", "", "2H2O"] {
            assert!(!looks_like_formula(t), "{t}");
        }
    }

    #[test]
    fn unknown_element_with_case_suggestion() {
        let e = bad("CL2");
        assert_eq!(e.kind, FormulaErrorKind::UnknownElement);
        assert_eq!(e.span, 0..2);
        assert_eq!(e.suggestions.first().map(String::as_str), Some("Cl2"));
        assert!(e.message.contains("`Cl`"), "{}", e.message);
        assert!(!e.message.ends_with('.'));
        let e = bad("NaCL");
        assert_eq!(
            (e.span.clone(), e.suggestions.first().cloned()),
            (2..4, Some("NaCl".to_string()))
        );
        let e = bad("Xx2O");
        assert_eq!(e.span, 0..2);
        assert!(e.suggestions.contains(&"Xe2O".to_string()));
        let e = bad("H2Q");
        assert_eq!((e.kind, e.span), (FormulaErrorKind::UnknownElement, 2..3));
    }

    #[test]
    fn syntax_errors_with_spans() {
        let e = bad("Ca3(PO4");
        assert_eq!((e.kind, e.span.clone()), (FormulaErrorKind::Syntax, 3..4));
        assert_eq!(e.suggestions, vec!["Ca3(PO4)".to_string()]);
        let e = bad("Ca3PO4)2");
        assert_eq!(e.span, 6..7);
        let e = bad("K4[Fe(CN)6)");
        assert_eq!(e.span, 10..11);
        assert_eq!(e.suggestions, vec!["K4[Fe(CN)6]".to_string()]);
        assert_eq!(bad("H2()O").span, 2..4);
        assert_eq!(bad("2H2O").span, 0..1);
        assert_eq!(bad("H2O!").span, 3..4);
        let e = bad("CuSO4.5H2O");
        assert_eq!(
            (e.span.clone(), e.suggestions.clone()),
            (5..6, vec!["CuSO4·5H2O".to_string()])
        );
        assert_eq!(bad("CuSO4·").span, 5..7);
        assert_eq!(bad("·H2O").span, 0..2);
        assert_eq!(bad("H0").span, 1..2);
        assert_eq!(bad("H2₃").span, 2..5);
        assert_eq!(bad("Fe^3").span, 2..4);
        let e = bad("Fe^+3");
        assert_eq!(e.suggestions, vec!["Fe^3+".to_string()]);
        let e = bad("Ca++");
        assert_eq!(e.suggestions, vec!["Ca^2+".to_string()]);
        let e = bad("Fe(aq)^3+");
        assert_eq!(
            (e.span.clone(), e.suggestions.clone()),
            (2..6, vec!["Fe^3+(aq)".to_string()])
        );
        let e = bad("H2O(x)");
        assert_eq!(e.span, 3..6);
        let e = bad("h2o");
        assert_eq!(
            (e.span.clone(), e.suggestions.clone()),
            (0..1, vec!["H2O".to_string()])
        );
        assert_eq!(
            bad("co2").suggestions,
            vec!["CO2".to_string(), "Co2".to_string()]
        );
        assert_eq!(bad("^2+").span, 0..1);
        assert_eq!(bad("SO4²-").suggestions, vec!["SO4^2-".to_string()]);
        assert_eq!(bad("Cl−").suggestions, vec!["Cl-".to_string()]);
        assert_eq!(bad("Fe^0+").kind, FormulaErrorKind::Syntax);
        assert_eq!(bad("Fe3+x").span, 4..5);
        assert_eq!(bad("").span, 0..0);
    }

    #[test]
    fn overflow_is_an_error() {
        let e = bad("H99999999999999999999");
        assert_eq!((e.kind, e.span), (FormulaErrorKind::CountOverflow, 1..21));
        let e = bad("((H3037000500)3037000500)2");
        assert_eq!(e.kind, FormulaErrorKind::CountOverflow);
        assert_eq!(
            bad("Fe^99999999999999999999+").kind,
            FormulaErrorKind::CountOverflow
        );
        assert_eq!(
            bad("H9223372036854775807H").kind,
            FormulaErrorKind::CountOverflow
        );
        assert_eq!(
            bad("Fe⁹⁹⁹⁹⁹⁹⁹⁹⁹⁹⁹⁹⁹⁹⁹⁹⁹⁹⁹⁹⁺").kind,
            FormulaErrorKind::CountOverflow
        );
    }

    #[test]
    fn deep_nesting_is_too_deep() {
        for n in [MAX_DEPTH + 1, 100_000, 1_000_000] {
            let text = format!("{}H{}", "(".repeat(n), ")".repeat(n));
            let e = bad(&text);
            assert_eq!(e.kind, FormulaErrorKind::TooDeep);
            assert_eq!(e.span, MAX_DEPTH..MAX_DEPTH + 1);
        }
        let fine = format!("{}H{}", "(".repeat(MAX_DEPTH), ")2".repeat(MAX_DEPTH));
        assert_eq!(ok(&fine).count(1), Ratio::from_integer(1i64 << MAX_DEPTH));
    }

    #[test]
    fn hill_order_and_mass() {
        assert_eq!(ok("C2H5OH").hill(), "C2H6O");
        assert_eq!(ok("SO4^2-").hill(), "O4S^2-");
        assert_eq!(ok("CuSO4·5H2O").hill(), "CuH10O9S");
        assert_eq!(ok("CaSO4·0.5H2O").hill(), "CaHO4.5S");
        assert_eq!(ok("NH4+").hill(), "H4N^+");
        assert_eq!(ok("Cl-").hill(), "Cl^-");
        assert_eq!(ok("CHCl3").hill(), "CHCl3");
        assert_eq!(ok("e-").hill(), "e-");
        // H2O: 2 x 1.008 + 15.999 = 18.015 (CIAAW 2021 abridged weights).
        assert!((ok("H2O").molar_mass() - 18.015).abs() < 1e-9);
        assert!(!ok("H2O").is_element_only() && ok("O2").is_element_only());
        assert!(!ok("O2^-").is_element_only());
        assert_eq!(ok("M").molar_mass(), 0.0);
    }

    proptest! {
        #[test]
        fn never_panics_and_spans_are_boundaries(s in "\\PC{0,40}") {
            check_error_span(&s);
        }

        #[test]
        fn formula_alphabet_never_panics(s in "[A-Za-z0-9()\\[\\]^+\\-·*.₀-₉⁰¹²³⁴-⁹⁺⁻]{0,30}") {
            check_error_span(&s);
        }

        /// The plain-formula shortcut reads exactly as the general reader
        /// does wherever it answers at all.
        #[test]
        fn plain_formulas_read_as_the_general_reader_does(
            pieces in proptest::collection::vec(proptest::sample::select(vec![
                "H", "C", "O", "N", "Cl", "Co", "Fe", "S", "Xx", "c", "0", "1", "2",
                "10", "007", "9999999999", "(g)", "(aq)", "(s)", "(l)", "(x)", "(",
                ")", "+", "-", "^2+", "[", "·", "*", "₂", ".5",
            ]), 1..8)
        ) {
            let text = pieces.concat();
            if let Some(fast) = plain(&text) {
                let general = Parser::new(&text, true).run();
                prop_assert_eq!(Ok(fast), general, "{}", text);
            }
        }
    }

    #[test]
    fn common_formulas_take_the_plain_reading() {
        for text in [
            "C2H6(g)",
            "H2O",
            "H2O(l)",
            "NaCl(s)",
            "CH4",
            "C12H22O11(aq)",
            "O2",
        ] {
            assert!(plain(text).is_some(), "{text}");
            assert_eq!(plain(text), Parser::new(text, true).run().ok(), "{text}");
        }
        for text in ["Fe(OH)3", "NH4+", "SO4^2-", "CuSO4·5H2O", "H0", "e-", "Hz"] {
            assert!(plain(text).is_none(), "{text}");
        }
    }

    fn check_error_span(s: &str) {
        if let Err(e) = parse_formula(s) {
            assert!(
                e.span.start <= e.span.end && e.span.end <= s.len(),
                "{s:?} {e:?}"
            );
            assert!(
                s.is_char_boundary(e.span.start) && s.is_char_boundary(e.span.end),
                "{s:?} {e:?}"
            );
            assert!(!e.message.ends_with('.'));
            for fixed in &e.suggestions {
                assert!(parse_formula(fixed).is_ok(), "{s:?} suggests {fixed:?}");
            }
        }
    }
}
