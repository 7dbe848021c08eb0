//! Lowering: syntax trees of a library's files into the [`Library`] model.
//!
//! This is where names are resolved (aliases, formulas), attributes are
//! matched against what each statement takes, quantities are converted to SI,
//! and the per-statement checks that need nothing but the statement itself
//! run: formulas, arrows, the third body and element and charge balance.
//!
//! Species are numbered in the order they are first met, so names and
//! mixtures are read statement by statement; what remains of each reaction
//! (its label, its balance, its data and their units) depends only on the
//! statement and the species, and is read on every core.

use super::quantity::{Kind, UnitReader};
use super::*;
use crate::chem::balance::{BalanceOutcome, balance, residuals};
use crate::chem::element_rows::ElementRows;
use crate::chem::formula::{FormulaErrorKind, SpeciesKind, looks_like_formula, parse_formula};
use crate::config::Config;
use crate::diagnostic::{Applicability, Diagnostic, Fix, TextEdit};
use crate::syntax::ast::{self, ArrowKind, Statement, StatementKind, ValueKind};
use crate::syntax::parser::truncate;
use crate::workspace::Workspace;
use compact_str::CompactString;
use rustc_hash::FxHashMap as HashMap;
use std::sync::Arc;

mod labels;
mod numbering;
pub use numbering::Numbering;

/// The attributes a species takes.
pub const SPECIES_ATTRIBUTES: &[&str] = &["dHf", "dGf", "S", "Cp", "source"];
/// The attributes a reaction takes.
pub const REACTION_ATTRIBUTES: &[&str] = &[
    "K", "Kc", "Kp", "logK", "pK", "dG", "dH", "dS", "kf", "kr", "k", "source",
];
/// The attributes a mixture takes besides its species lines.
pub const MIXTURE_ATTRIBUTES: &[&str] = &["temperature", "pressure", "volume", "activity"];
/// An equation rewritten with the given coefficients (1 left unwritten),
/// species spelled as the user wrote them and in their order.
pub fn balanced_text(
    eq: &ast::Equation,
    arrow: &str,
    coefficients: &[num_bigint::BigInt],
) -> String {
    let render = |terms: &[ast::Term], coefs: &[num_bigint::BigInt]| {
        terms
            .iter()
            .zip(coefs)
            .map(|(t, c)| {
                if *c == num_bigint::BigInt::from(1) {
                    t.species.text.to_string()
                } else {
                    format!("{c} {}", t.species.text)
                }
            })
            .collect::<Vec<_>>()
            .join(" + ")
    };
    let n = eq.left.len().min(coefficients.len());
    format!(
        "{} {arrow} {}",
        render(&eq.left, &coefficients[..n]),
        render(&eq.right, &coefficients[n..])
    )
}

/// The most species an equation may have for stoik to search its balance.
pub const MAX_BALANCE_SPECIES: usize = 64;

/// The arguments of `arrhenius(...)`.
pub const ARRHENIUS_ARGUMENTS: &[&str] = &["A", "n", "Ea"];

/// Build the library of `files` (the used files before their users).
pub fn lower(ws: &Workspace, files: &[FileId], config: &Config) -> (Library, Vec<Diagnostic>) {
    lower_with(ws, files, config, Memory::Forget)
}

/// [`lower`] for the language server, which lowers the same library again
/// after every edit: the library keeps its species numbering, and the
/// numbering of `last` (the library of the last analysis) is reused when
/// the edit left the species texts and declarations it depends on alone.
pub fn lower_after(
    ws: &Workspace,
    files: &[FileId],
    config: &Config,
    last: Option<&Library>,
) -> (Library, Vec<Diagnostic>) {
    lower_with(ws, files, config, Memory::Keep(last))
}

/// Whether a lowering keeps its species numbering for the next one.
#[derive(Clone, Copy)]
enum Memory<'a> {
    /// A single run (the command line): nothing is kept.
    Forget,
    /// Kept, with the last library's numbering to reuse if it still holds.
    Keep(Option<&'a Library>),
}

fn lower_with(
    ws: &Workspace,
    files: &[FileId],
    config: &Config,
    memory: Memory,
) -> (Library, Vec<Diagnostic>) {
    let mut l = Lowering {
        ws,
        config,
        lib: Library {
            files: files.to_vec(),
            ..Library::default()
        },
        diags: Vec::new(),
        aliases: HashMap::default(),
        by_key: Arc::default(),
        by_text: Arc::default(),
        ahead: Vec::new(),
        taken: 0,
    };
    let count = l.reserve(files);
    // One unit reader per file, for both passes.
    let readers: Vec<UnitReader> = files.iter().map(|&file| l.reader(file)).collect();
    for (&file, reader) in files.iter().zip(&readers) {
        for s in &ws.file(file).syntax.statements {
            if let StatementKind::Species { alias, formula } = &s.kind {
                l.species_statement(file, reader, s, alias.as_ref(), formula.as_ref());
            }
        }
    }
    // Names and mixtures are read in statement order, since species are
    // numbered as they are first met. The rest of each reaction (its places,
    // its data and whether its label was used before) depends on nothing
    // but the statements, and is read meanwhile on another core (large
    // libraries); the terms join it afterwards, when the balance is checked
    // on every core.
    let clock = crate::checks::Phases::start();
    let aside = crate::parallel::cores() > 1 && count >= PARALLEL_REACTIONS;
    let (ws, config, readers) = (l.ws, l.config, &readers);
    let names_and_heads = |l: &mut Lowering<'_>| {
        l.settle_names_ahead(files, aside, memory);
        clock.mark("species names");
        let mut heads = Vec::with_capacity(count);
        for (&file, reader) in files.iter().zip(readers) {
            for s in &ws.file(file).syntax.statements {
                match &s.kind {
                    StatementKind::Reaction {
                        equation: Some(eq), ..
                    } => heads.push(l.reaction_head(file, eq)),
                    StatementKind::Mixture { name } => {
                        l.mixture_statement(file, reader, s, name.as_ref())
                    }
                    _ => {}
                }
            }
        }
        // Every species text was taken; the queue is freed before the
        // reactions are finished.
        debug_assert_eq!(l.taken, l.ahead.len());
        l.ahead = Vec::new();
        clock.mark("reaction heads");
        heads
    };
    let shells = || Lowering::reaction_shells(ws, config, files, readers, count);
    let (heads, (shells, shell_diags)) = if aside {
        crate::parallel::both(|| names_and_heads(&mut l), shells)
    } else {
        (names_and_heads(&mut l), shells())
    };
    l.diags.extend(shell_diags);
    l.finish_reactions(shells, heads, aside);
    clock.mark("reaction bodies");
    l.lib.reactions.shrink_to_fit();
    l.lib.species.shrink_to_fit();
    (l.lib, l.diags)
}

/// The species of a reaction statement as read in statement order,
/// waiting to be joined to the rest of the reaction.
struct ReactionHead<'a> {
    file: FileId,
    equation: &'a ast::Equation,
    terms: Vec<Term>,
    /// False when a species could not be read.
    complete: bool,
}

/// Libraries with fewer reactions than this are lowered on one thread.
const PARALLEL_REACTIONS: usize = 4096;

struct Lowering<'w> {
    ws: &'w Workspace,
    config: &'w Config,
    lib: Library,
    diags: Vec<Diagnostic>,
    aliases: HashMap<CompactString, SpeciesId>,
    /// Species by the canonical key of their formula (non-alias species),
    /// shared with the numbering a library keeps.
    by_key: Arc<HashMap<FormulaKey, SpeciesId>>,
    /// Resolution of each species text met so far (`None` when it failed),
    /// shared likewise.
    by_text: Arc<HashMap<CompactString, Option<SpeciesId>>>,
    /// Every species text of the equations and mixtures in statement
    /// order, with what it names once numbered, for [`Lowering::resolve`]
    /// to take in turn instead of looking each up.
    ahead: Vec<(&'w ast::Name, Option<SpeciesId>)>,
    /// How many of `ahead` were taken.
    taken: usize,
}

/// A key under which two spellings of one formula in one phase meet.
type FormulaKey = (
    Vec<(u8, num_rational::Ratio<i64>)>,
    i64,
    Option<crate::chem::formula::Phase>,
    SpeciesKind,
);

fn formula_key(f: &crate::chem::formula::Formula) -> FormulaKey {
    (f.composition.clone(), f.charge, f.phase, f.kind)
}

/// What a species text reads as, before it is numbered. A formula comes
/// with its key and its name, made where it is read (on any core), so that
/// numbering only moves them.
enum Reading {
    Alias(SpeciesId),
    Formula {
        formula: crate::chem::formula::Formula,
        key: FormulaKey,
        name: CompactString,
    },
    /// Neither an alias nor a formula: reported at every occurrence.
    Unresolved,
}

/// A species text as first met in a run of statements, read ahead.
struct NameReading<'a> {
    file: FileId,
    name: &'a ast::Name,
    reading: Reading,
}

/// The hint that a formula reads in a way its writer may not have meant.
fn reading_note(file: FileId, span: crate::span::Span, note: String) -> Diagnostic {
    Diagnostic::new("ambiguous-formula", file, span, note)
        .with_severity(crate::diagnostic::Severity::Hint)
}

/// What `text` names, given the declared aliases.
fn read_name(aliases: &HashMap<CompactString, SpeciesId>, text: &str) -> Reading {
    if let Some(id) = aliases.get(text) {
        return Reading::Alias(*id);
    }
    if !looks_like_formula(text) {
        return Reading::Unresolved;
    }
    match parse_formula(text) {
        Ok(formula) => Reading::Formula {
            key: formula_key(&formula),
            formula,
            name: text.into(),
        },
        Err(_) => Reading::Unresolved,
    }
}

/// True when a line of a mixture names a species, exactly as
/// [`Lowering::mixture_statement`] decides it: not one of its attributes,
/// and a formula or a declared alias.
fn mixture_names_species(aliases: &HashMap<CompactString, SpeciesId>, text: &str) -> bool {
    !matches!(text, "temperature" | "pressure" | "volume" | "activity")
        && (looks_like_formula(text) || aliases.contains_key(text))
}

/// The distinct species texts of `statements` (equations and named
/// mixtures) in the order they are first met, each read, and every
/// occurrence with the index of its text.
fn read_names<'a>(
    aliases: &HashMap<CompactString, SpeciesId>,
    statements: &[(FileId, &'a Statement)],
) -> (Vec<NameReading<'a>>, Vec<Occurrence<'a>>) {
    let (met, occurrences) = first_met(aliases, statements);
    let readings = met
        .into_iter()
        .map(|(file, name)| NameReading {
            file,
            name,
            reading: read_name(aliases, &name.text),
        })
        .collect();
    (readings, occurrences)
}

/// A species text where it stands in an equation or a mixture, with the
/// index of its text among the distinct ones.
type Occurrence<'a> = (&'a ast::Name, u32);

/// The distinct species texts of `statements` (equations and named
/// mixtures) in the order they are first met, and every occurrence in
/// statement order with the index of its text.
fn first_met<'a>(
    aliases: &HashMap<CompactString, SpeciesId>,
    statements: &[(FileId, &'a Statement)],
) -> (Vec<(FileId, &'a ast::Name)>, Vec<Occurrence<'a>>) {
    // The lists are sized for a library whose reactions name two new
    // species each and three in all, so that growing them rarely copies.
    // The map of texts grows with the distinct texts instead: sized for
    // the worst case, its lookups scattered over tens of megabytes on a
    // large library (which names far fewer species than that) and missed
    // the caches.
    let mut seen: HashMap<&str, u32> = HashMap::default();
    let mut out = Vec::with_capacity(2 * statements.len());
    let mut occurrences = Vec::with_capacity(3 * statements.len());
    let mut meet = |file: FileId, name: &'a ast::Name| {
        let next = out.len() as u32;
        let text = *seen.entry(name.text.as_str()).or_insert(next);
        if text == next {
            out.push((file, name));
        }
        occurrences.push((name, text));
    };
    for &(file, s) in statements {
        match &s.kind {
            StatementKind::Reaction {
                equation: Some(eq), ..
            } => {
                for t in eq.left.iter().chain(&eq.right) {
                    meet(file, &t.species);
                }
            }
            StatementKind::Mixture { name: Some(_) } => {
                for a in &s.attributes {
                    if mixture_names_species(aliases, &a.name.text) {
                        meet(file, &a.name);
                    }
                }
            }
            _ => {}
        }
    }
    (out, occurrences)
}

impl<'w> Lowering<'w> {
    /// A lowering with no names of its own, for the per-statement work that
    /// runs on another core; only its diagnostics are kept.
    fn worker(ws: &'w Workspace, config: &'w Config) -> Self {
        Lowering {
            ws,
            config,
            lib: Library::default(),
            diags: Vec::new(),
            aliases: HashMap::default(),
            by_key: Arc::default(),
            by_text: Arc::default(),
            ahead: Vec::new(),
            taken: 0,
        }
    }

    /// Finish every reaction: give each shell the terms its head read and
    /// check its balance. With `parallel`, in two halves side by side, each
    /// half's diagnostics appended in order.
    fn finish_reactions(
        &mut self,
        mut shells: Vec<Reaction>,
        mut heads: Vec<ReactionHead>,
        parallel: bool,
    ) {
        let (ws, config) = (self.ws, self.config);
        let split = if parallel {
            heads.len() / 2
        } else {
            heads.len()
        };
        let second_heads = heads.split_off(split);
        let species = &self.lib.species;
        let rows = ElementRows::new(species.iter().map(|s| &*s.formula));
        let (first, second) = shells.split_at_mut(split);
        let finish = |part: &mut [Reaction], heads: Vec<ReactionHead>| {
            let mut worker = Lowering::worker(ws, config);
            for (r, head) in part.iter_mut().zip(heads) {
                worker.finish_reaction(r, head, species, &rows);
            }
            worker.diags
        };
        let (mine, more) = if second_heads.is_empty() {
            (finish(first, heads), Vec::new())
        } else {
            crate::parallel::both(|| finish(first, heads), || finish(second, second_heads))
        };
        self.diags.extend(mine);
        self.diags.extend(more);
        self.lib.reactions = shells;
    }

    fn reader(&mut self, file: FileId) -> UnitReader {
        let (reader, diags) = UnitReader::for_file(self.ws, file, self.config);
        self.diags.extend(diags);
        reader
    }

    /// Size the declared species for the statements of
    /// `files` up front, and count the reactions: on large libraries,
    /// growing them step by step copied and rehashed them over and over.
    /// The species the equations name are sized once they are read
    /// ([`Lowering::settle_names_ahead`]).
    fn reserve(&mut self, files: &[FileId]) -> usize {
        let (mut species, mut reactions) = (0, 0);
        for &file in files {
            for s in &self.ws.file(file).syntax.statements {
                match &s.kind {
                    StatementKind::Species { .. } => species += 1,
                    StatementKind::Reaction {
                        equation: Some(_), ..
                    } => reactions += 1,
                    _ => {}
                }
            }
        }
        self.lib.species.reserve(species);
        Arc::make_mut(&mut self.by_key).reserve(species);
        reactions
    }

    fn push(&mut self, d: Diagnostic) {
        self.diags.push(d);
    }

    /// Report a formula that does not parse; `span` is the token's span.
    fn formula_error(&mut self, file: FileId, span: crate::span::Span, text: &str) -> bool {
        match parse_formula(text) {
            Ok(_) => false,
            Err(e) => {
                let at =
                    crate::span::Span::new(span.start() + e.span.start, span.start() + e.span.end);
                let rule = match e.kind {
                    FormulaErrorKind::UnknownElement => "unknown-element",
                    _ => "syntax",
                };
                let mut d = Diagnostic::new(rule, file, at, e.message.clone());
                if let Some(first) = e.suggestions.first() {
                    d = d.with_help(format!("did you mean `{first}`?"));
                    for s in e.suggestions.iter().take(1) {
                        d = d.with_fix(Fix {
                            title: format!("write `{s}`"),
                            applicability: Applicability::Unsafe,
                            edits: vec![TextEdit {
                                file,
                                span,
                                new_text: s.clone(),
                            }],
                        });
                    }
                }
                self.push(d);
                true
            }
        }
    }

    fn species_statement(
        &mut self,
        file: FileId,
        reader: &UnitReader,
        s: &Statement,
        alias: Option<&ast::Name>,
        formula: Option<&ast::Name>,
    ) {
        let Some(formula_name) = formula else { return };
        let parsed = match parse_formula(&formula_name.text) {
            Ok(f) => f,
            Err(_) => {
                self.formula_error(file, formula_name.span, &formula_name.text);
                return;
            }
        };
        self.reading_note(file, formula_name, &parsed);
        let loc = Loc::new(file, s.span);
        let id = if let Some(alias) = alias {
            if looks_like_formula(&alias.text) && parse_formula(&alias.text).is_ok() {
                self.push(
                    Diagnostic::new(
                        "syntax",
                        file,
                        alias.span,
                        format!(
                            "`{}` reads as a formula, so it cannot be an alias",
                            truncate(&alias.text, 30)
                        ),
                    )
                    .with_help(
                        "an alias starts with a lowercase letter, such as `ethanol` or `isoA`",
                    ),
                );
                return;
            }
            if let Some(prev) = self.aliases.get(&alias.text).copied() {
                let prev_loc = self.lib.species(prev).declared.unwrap_or(loc);
                self.push(
                    Diagnostic::new(
                        "duplicate-species",
                        file,
                        alias.span,
                        format!("the alias `{}` is declared twice", alias.text),
                    )
                    .with_related(
                        prev_loc.file,
                        prev_loc.span,
                        "first declared here",
                    ),
                );
                return;
            }
            let id = self.new_species(
                alias.text.clone(),
                Some(alias.text.as_str().to_owned()),
                parsed,
                loc,
            );
            self.lib.species[id.0 as usize].declared = Some(loc);
            self.aliases.insert(alias.text.clone(), id);
            id
        } else {
            let key = formula_key(&parsed);
            match self.by_key.get(&key).copied() {
                Some(prev) if self.lib.species(prev).declared.is_some() => {
                    let prev_loc = self.lib.species(prev).declared.unwrap_or(loc);
                    self.push(
                        Diagnostic::new(
                            "duplicate-species",
                            file,
                            formula_name.span,
                            format!("`{}` is declared twice", formula_name.text),
                        )
                        .with_related(prev_loc.file, prev_loc.span, "first declared here")
                        .with_help("merge the two declarations, or give one an alias"),
                    );
                    return;
                }
                Some(prev) => {
                    self.lib.species[prev.0 as usize].declared = Some(loc);
                    prev
                }
                None => {
                    let id = self.new_species(formula_name.text.clone(), None, parsed, loc);
                    self.lib.species[id.0 as usize].declared = Some(loc);
                    Arc::make_mut(&mut self.by_key).insert(key, id);
                    id
                }
            }
        };
        let mut data = SpeciesData::default();
        for a in &s.attributes {
            let slot = match a.name.text.as_str() {
                "dHf" => Some((&mut data.dhf, Kind::Energy)),
                "dGf" => Some((&mut data.dgf, Kind::Energy)),
                "S" => Some((&mut data.s, Kind::Entropy)),
                "Cp" => Some((&mut data.cp, Kind::Entropy)),
                "source" => {
                    data.source = self.text_value(file, a);
                    None
                }
                _ => {
                    self.unknown_attribute(file, a, SPECIES_ATTRIBUTES, "a species");
                    None
                }
            };
            if let Some((slot, kind)) = slot
                && let Some(d) = self.datum(file, reader, a, kind)
            {
                *slot = Some(d);
            }
        }
        self.lib.species[id.0 as usize].data = (!data.is_empty()).then(|| Box::new(data));
    }

    fn reading_note(&mut self, file: FileId, name: &ast::Name, f: &crate::chem::formula::Formula) {
        if let Some(note) = &f.reading_note
            && !self.by_text.contains_key(&name.text)
        {
            self.push(reading_note(file, name.span, note.clone()));
        }
    }

    fn new_species(
        &mut self,
        name: CompactString,
        alias: Option<String>,
        formula: crate::chem::formula::Formula,
        loc: Loc,
    ) -> SpeciesId {
        let id = SpeciesId(self.lib.species.len() as u32);
        self.lib.species.push(Species {
            name,
            alias,
            formula: Arc::new(formula),
            declared: None,
            first_use: loc,
            data: None,
        });
        id
    }

    /// Resolve a species as written in an equation or a mixture.
    fn resolve(&mut self, file: FileId, name: &ast::Name) -> Option<SpeciesId> {
        let ahead = self
            .ahead
            .get(self.taken)
            .filter(|(met, _)| std::ptr::eq(*met, name));
        let known = match ahead {
            Some(&(_, id)) => {
                self.taken += 1;
                Some(id)
            }
            None => self.by_text.get(&name.text).copied(),
        };
        let resolved = match known {
            Some(r) => r,
            None => {
                let reading = read_name(&self.aliases, &name.text);
                self.settle(file, name, reading)
            }
        };
        if resolved.is_none() {
            // Every failing occurrence is reported, not only the first.
            self.report_unresolved(file, name);
        }
        resolved
    }

    /// Number a species text met for the first time, from its reading: an
    /// alias, a formula (a new species unless another spelling of it was
    /// met), or nothing. Failures are reported by [`Lowering::resolve`].
    fn settle(&mut self, file: FileId, name: &ast::Name, reading: Reading) -> Option<SpeciesId> {
        let resolved = match reading {
            Reading::Alias(id) => Some(id),
            Reading::Unresolved => None,
            Reading::Formula {
                formula,
                key,
                name: text,
            } => {
                self.reading_note(file, name, &formula);
                // The species a new formula becomes is the next one.
                let next = SpeciesId(self.lib.species.len() as u32);
                match Arc::make_mut(&mut self.by_key).entry(key) {
                    std::collections::hash_map::Entry::Occupied(e) => Some(*e.get()),
                    std::collections::hash_map::Entry::Vacant(e) => {
                        e.insert(next);
                        let id = self.new_species(text, None, formula, Loc::new(file, name.span));
                        debug_assert_eq!(id, next);
                        Some(id)
                    }
                }
            }
        };
        Arc::make_mut(&mut self.by_text).insert(name.text.clone(), resolved);
        resolved
    }

    /// Read every species text of the equations and mixtures of `files`
    /// ahead and number them in the order they are first met, so that the
    /// pass in statement order finds each one already settled. Reading
    /// (the formula parser) is the costly part and depends on nothing but
    /// the text and the aliases, so large libraries read it in two halves
    /// side by side; only the numbering is serial. A lowering that keeps
    /// its numbering goes through [`Lowering::number_keeping`].
    fn settle_names_ahead(&mut self, files: &[FileId], parallel: bool, memory: Memory) {
        let ws = self.ws;
        let statements: Vec<(FileId, &Statement)> = files
            .iter()
            .flat_map(|&f| ws.file(f).syntax.statements.iter().map(move |s| (f, s)))
            .filter(|(_, s)| {
                matches!(
                    s.kind,
                    StatementKind::Reaction {
                        equation: Some(_),
                        ..
                    } | StatementKind::Mixture { name: Some(_) }
                )
            })
            .collect();
        if let Memory::Keep(last) = memory {
            self.number_keeping(&statements, parallel, last);
            return;
        }
        let aliases = &self.aliases;
        let parts: Vec<(Vec<NameReading>, Vec<Occurrence>)> = if parallel {
            let (first, second) = statements.split_at(statements.len() / 2);
            std::thread::scope(|scope| {
                let other = scope.spawn(|| read_names(aliases, second));
                let mine = read_names(aliases, first);
                let other = other
                    .join()
                    .unwrap_or_else(|panic| std::panic::resume_unwind(panic));
                vec![mine, other]
            })
        } else {
            vec![read_names(aliases, &statements)]
        };
        // Sized once for every text read (a text met in both halves is
        // counted twice), so that numbering them never rehashes.
        self.reserve_names(parts.iter().map(|(texts, _)| texts.len()).sum());
        self.ahead
            .reserve(parts.iter().map(|(_, occurrences)| occurrences.len()).sum());
        for (i, (part, occurrences)) in parts.into_iter().enumerate() {
            // The first part's texts are distinct and none was met before.
            let fresh = i == 0 && self.by_text.is_empty();
            let ids: Vec<Option<SpeciesId>> = part
                .into_iter()
                .map(|r| match self.by_text.get(&r.name.text) {
                    Some(&id) if !fresh => id,
                    _ => self.settle(r.file, r.name, r.reading),
                })
                .collect();
            self.take_ahead(&occurrences, &ids);
        }
    }

    /// Queue `occurrences` for [`Lowering::resolve`], given what their
    /// texts name.
    fn take_ahead(&mut self, occurrences: &[Occurrence<'w>], ids: &[Option<SpeciesId>]) {
        self.ahead.extend(
            occurrences
                .iter()
                .map(|&(name, text)| (name, ids[text as usize])),
        );
    }

    /// Room for `texts` more species texts, so that numbering them never
    /// rehashes.
    fn reserve_names(&mut self, texts: usize) {
        self.lib.species.reserve(texts);
        Arc::make_mut(&mut self.by_text).reserve(texts);
        Arc::make_mut(&mut self.by_key).reserve(texts);
    }

    fn report_unresolved(&mut self, file: FileId, name: &ast::Name) {
        if looks_like_formula(&name.text) {
            self.formula_error(file, name.span, &name.text);
            return;
        }
        let nearest = self
            .aliases
            .keys()
            .map(|a| (strsim::levenshtein(a, &name.text), a.clone()))
            .filter(|(d, a)| *d <= 2.max(a.len() / 3))
            .min();
        let mut d = Diagnostic::new(
            "unknown-species",
            file,
            name.span,
            format!(
                "`{}` is neither a declared alias nor a formula",
                truncate(&name.text, 40)
            ),
        );
        d = match nearest {
            Some((_, a)) => d.with_help(format!("did you mean `{a}`?")).with_fix(Fix {
                title: format!("write `{a}`"),
                applicability: Applicability::Unsafe,
                edits: vec![TextEdit {
                    file,
                    span: name.span,
                    new_text: a.to_string(),
                }],
            }),
            None => d.with_help(format!(
                "declare it (`species {} = FORMULA`) or write the formula; formulas start with an uppercase element symbol",
                truncate(&name.text, 30)
            )),
        };
        self.push(d);
    }

    fn unknown_attribute(&mut self, file: FileId, a: &ast::Attribute, known: &[&str], what: &str) {
        let nearest = known
            .iter()
            .map(|k| {
                let exact_case = k.eq_ignore_ascii_case(&a.name.text);
                (
                    if exact_case {
                        0
                    } else {
                        strsim::levenshtein(k, &a.name.text) + 1
                    },
                    *k,
                )
            })
            .min()
            .filter(|(d, _)| *d <= 3);
        let mut d = Diagnostic::new(
            "unknown-attribute",
            file,
            a.name.span,
            format!("{what} has no attribute `{}`", truncate(&a.name.text, 30)),
        );
        d = match nearest {
            Some((_, k)) => d.with_help(format!("did you mean `{k}`?")).with_fix(Fix {
                title: format!("write `{k}`"),
                applicability: Applicability::Unsafe,
                edits: vec![TextEdit {
                    file,
                    span: a.name.span,
                    new_text: k.to_string(),
                }],
            }),
            None => d.with_help(format!("{what} takes {}", known.join(", "))),
        };
        self.push(d);
    }

    fn text_value(&mut self, file: FileId, a: &ast::Attribute) -> Option<String> {
        match &a.value.kind {
            ValueKind::Text(t) => Some(t.clone()),
            ValueKind::Missing => None,
            _ => {
                self.push(
                    Diagnostic::new(
                        "syntax",
                        file,
                        a.value.span,
                        format!("`{}` takes a string in double quotes", a.name.text),
                    )
                    .with_help(format!("write `{} = \"...\"`", a.name.text)),
                );
                None
            }
        }
    }

    /// A quantity attribute read as `kind`, with its `at` temperature.
    fn datum(
        &mut self,
        file: FileId,
        reader: &UnitReader,
        a: &ast::Attribute,
        kind: Kind,
    ) -> Option<Datum> {
        let q = self.quantity(file, a)?;
        let (value, _) = reader.read(q, kind, &a.name.text, &mut self.diags)?;
        let (at_k, at_explicit) = self.at(reader, q);
        Some(Datum {
            value,
            loc: Loc::new(file, a.span),
            at_k,
            at_explicit,
        })
    }

    fn at(&mut self, reader: &UnitReader, q: &ast::Quantity) -> (f64, bool) {
        match &q.at {
            Some(t) => match reader.read(t, Kind::Temperature, "at", &mut self.diags) {
                Some((k, _)) => (k, true),
                None => (crate::units::constants::STANDARD_TEMPERATURE, true),
            },
            None => (crate::units::constants::STANDARD_TEMPERATURE, false),
        }
    }

    fn quantity<'a>(&mut self, file: FileId, a: &'a ast::Attribute) -> Option<&'a ast::Quantity> {
        match &a.value.kind {
            ValueKind::Quantity(q) => Some(q),
            ValueKind::Missing => None,
            ValueKind::Word(w) => {
                let lower = w.to_ascii_lowercase();
                let message =
                    if ["nan", "inf", "infinity", "-inf", "+inf"].contains(&lower.as_str()) {
                        format!("`{}` takes a finite number, found `{w}`", a.name.text)
                    } else {
                        format!(
                            "`{}` takes a number, found `{}`",
                            a.name.text,
                            truncate(w, 30)
                        )
                    };
                self.push(Diagnostic::new("syntax", file, a.value.span, message));
                None
            }
            _ => {
                self.push(Diagnostic::new(
                    "syntax",
                    file,
                    a.value.span,
                    format!("`{}` takes a number", a.name.text),
                ));
                None
            }
        }
    }

    /// The part of a reaction statement read in statement order: its
    /// species.
    fn reaction_head<'s>(&mut self, file: FileId, eq: &'s ast::Equation) -> ReactionHead<'s> {
        let mut terms = Vec::with_capacity(eq.left.len() + eq.right.len());
        let mut complete = true;
        for (side, list) in [(Side::Left, &eq.left), (Side::Right, &eq.right)] {
            for t in list {
                match self.resolve(file, &t.species) {
                    Some(species) => terms.push(Term {
                        species,
                        coefficient: t.coefficient_value(),
                        side,
                        loc: Loc::new(file, t.span),
                    }),
                    None => complete = false,
                }
            }
        }
        ReactionHead {
            file,
            equation: eq,
            terms,
            complete,
        }
    }

    /// A reaction statement read without its species: its places, its
    /// arrow and its data, which depend on nothing else, so that they are
    /// read on another core while this one reads the names
    /// ([`Lowering::finish_reaction`] adds the rest).
    fn reaction_shell(
        &mut self,
        file: FileId,
        reader: &UnitReader,
        s: &Statement,
        label: Option<&ast::Name>,
        eq: &ast::Equation,
    ) -> Reaction {
        let label_loc = label.map(|l| Loc::new(file, l.span));
        let header_end = eq.span.end();
        // Each list is sized for the attributes that fill it, so that
        // pushing does not over-allocate and the shrinking below does not
        // copy (a library holds up to millions of them).
        let count = |names: &[&str]| {
            s.attributes
                .iter()
                .filter(|a| names.contains(&a.name.text.as_str()))
                .count()
        };
        let mut reaction = Reaction {
            label: label.map(|l| l.text.as_str().to_owned()),
            label_loc,
            loc: Loc::new(file, crate::span::Span::new(s.keyword.start(), header_end)),
            statement_loc: Loc::new(file, s.span),
            equation_loc: Loc::new(file, eq.span),
            arrow: eq.arrow.kind,
            arrow_loc: Loc::new(file, eq.arrow.span),
            net: Vec::new(),
            terms: Vec::new(),
            complete: false,
            balanced: false,
            k: Vec::with_capacity(count(&["K", "logK", "pK", "Kc", "Kp"])),
            dg: Vec::with_capacity(count(&["dG"])),
            dh: Vec::with_capacity(count(&["dH"])),
            ds: Vec::with_capacity(count(&["dS"])),
            rates: Vec::with_capacity(count(&["kf", "kr", "k"])),
            source: None,
        };
        if eq.arrow.kind == ArrowKind::Resonance {
            self.push(
                Diagnostic::new(
                    "resonance-arrow",
                    file,
                    eq.arrow.span,
                    "`<->` means resonance between structures, not a chemical equilibrium",
                )
                .with_help("use `<=>` (or `⇌`) for an equilibrium")
                .with_fix(Fix {
                    title: "replace the arrow with `<=>`".into(),
                    applicability: Applicability::Safe,
                    edits: vec![TextEdit {
                        file,
                        span: eq.arrow.span,
                        new_text: "<=>".into(),
                    }],
                }),
            );
        }
        self.reaction_attributes(file, reader, s, &mut reaction);
        // Room left by attributes that did not read is given back.
        reaction.k.shrink_to_fit();
        reaction.dg.shrink_to_fit();
        reaction.dh.shrink_to_fit();
        reaction.ds.shrink_to_fit();
        reaction.rates.shrink_to_fit();
        reaction
    }

    /// The shells of every reaction statement of `files`, in order, with
    /// the diagnostics of their data.
    fn reaction_shells(
        ws: &'w Workspace,
        config: &'w Config,
        files: &[FileId],
        readers: &[UnitReader],
        count: usize,
    ) -> (Vec<Reaction>, Vec<Diagnostic>) {
        let mut worker = Lowering::worker(ws, config);
        let mut shells = Vec::with_capacity(count);
        for (&file, reader) in files.iter().zip(readers) {
            for s in &ws.file(file).syntax.statements {
                if let StatementKind::Reaction {
                    label,
                    equation: Some(eq),
                } = &s.kind
                {
                    shells.push(worker.reaction_shell(file, reader, s, label.as_ref(), eq));
                }
            }
        }
        let used = files.iter().flat_map(|&file| {
            ws.file(file)
                .syntax
                .statements
                .iter()
                .filter_map(move |s| match &s.kind {
                    StatementKind::Reaction {
                        label: Some(l),
                        equation: Some(_),
                    } => Some((file, l)),
                    _ => None,
                })
        });
        worker.diags.extend(labels::duplicate_labels(used));
        (shells, worker.diags)
    }

    /// Give a reaction the terms its head read and check its balance.
    /// `species` are the library's species.
    fn finish_reaction(
        &mut self,
        r: &mut Reaction,
        head: ReactionHead,
        species: &[Species],
        rows: &ElementRows,
    ) {
        let ReactionHead {
            file,
            equation: eq,
            mut terms,
            complete,
        } = head;
        terms.shrink_to_fit();
        r.net = Reaction::net_of(&terms);
        r.terms = terms;
        r.complete = complete;
        if complete {
            r.balanced = self.check_balance_with(file, eq, r, species, rows);
        }
    }

    fn reaction_attributes(
        &mut self,
        file: FileId,
        reader: &UnitReader,
        s: &Statement,
        r: &mut Reaction,
    ) {
        for a in &s.attributes {
            let name = a.name.text.as_str();
            match name {
                "K" | "logK" | "pK" | "Kc" | "Kp" => {
                    let form = match name {
                        "K" => KForm::K,
                        "logK" => KForm::LogK,
                        "pK" => KForm::PK,
                        "Kc" => KForm::Kc,
                        _ => KForm::Kp,
                    };
                    if let Some(k) = self.k_value(file, reader, a, form) {
                        r.k.push(k);
                    }
                }
                "dG" | "dH" => {
                    if let Some(d) = self.datum(file, reader, a, Kind::Energy) {
                        if name == "dG" {
                            r.dg.push(d)
                        } else {
                            r.dh.push(d)
                        }
                    }
                }
                "dS" => {
                    if let Some(d) = self.datum(file, reader, a, Kind::Entropy) {
                        r.ds.push(d);
                    }
                }
                "kf" | "kr" | "k" => {
                    let kind = if name == "kr" {
                        RateKind::Reverse
                    } else {
                        RateKind::Forward
                    };
                    if let Some(rate) = self.rate(file, reader, a, kind, r) {
                        r.rates.push(rate);
                    }
                }
                "source" => r.source = self.text_value(file, a),
                _ => self.unknown_attribute(file, a, REACTION_ATTRIBUTES, "a reaction"),
            }
        }
    }

    fn k_value(
        &mut self,
        file: FileId,
        reader: &UnitReader,
        a: &ast::Attribute,
        form: KForm,
    ) -> Option<KValue> {
        let q = self.quantity(file, a)?;
        let kind = match form {
            KForm::Kc | KForm::Kp => Kind::Free,
            _ => Kind::Dimensionless,
        };
        let (si, dimension) = reader.read(q, kind, &a.name.text, &mut self.diags)?;
        let ln_si = match form {
            KForm::LogK => Some(q.number * std::f64::consts::LN_10),
            KForm::PK => Some(-q.number * std::f64::consts::LN_10),
            _ if si > 0.0 => Some(si.ln()),
            _ => {
                self.push(
                    Diagnostic::new(
                        "syntax",
                        file,
                        q.number_span,
                        format!("{} must be positive, found {}", a.name.text, q.number),
                    )
                    .with_help("an equilibrium constant is a ratio of activities and is always greater than zero"),
                );
                None
            }
        };
        let (at_k, at_explicit) = self.at(reader, q);
        Some(KValue {
            form,
            number: q.number,
            ln_si,
            at_k,
            at_explicit,
            loc: Loc::new(file, a.span),
            number_loc: Loc::new(file, q.number_span),
            unit_loc: q.unit.as_ref().map(|u| Loc::new(file, u.span)),
            dimension,
        })
    }

    fn rate(
        &mut self,
        file: FileId,
        reader: &UnitReader,
        a: &ast::Attribute,
        kind: RateKind,
        r: &Reaction,
    ) -> Option<Rate> {
        let loc = Loc::new(file, a.span);
        match &a.value.kind {
            ValueKind::Arrhenius(args) => {
                let mut pre = None;
                let mut n = 0.0;
                let mut ea = 0.0;
                let mut dimension = None;
                for arg in args {
                    match arg.name.text.as_str() {
                        "A" => {
                            let q = self.quantity(file, arg)?;
                            let (v, dim) = reader.read(q, Kind::Free, "A", &mut self.diags)?;
                            pre = Some(v);
                            dimension = dim;
                        }
                        "n" => {
                            let q = self.quantity(file, arg)?;
                            let (v, _) =
                                reader.read(q, Kind::Dimensionless, "n", &mut self.diags)?;
                            n = v;
                        }
                        "Ea" => {
                            let q = self.quantity(file, arg)?;
                            let (v, _) =
                                reader.read(q, Kind::ActivationEnergy, "Ea", &mut self.diags)?;
                            ea = v;
                        }
                        _ => self.unknown_attribute(file, arg, ARRHENIUS_ARGUMENTS, "`arrhenius`"),
                    }
                }
                let Some(a_value) = pre else {
                    self.push(Diagnostic::new(
                        "syntax",
                        file,
                        a.value.span,
                        "`arrhenius` needs the pre-exponential factor `A`",
                    ));
                    return None;
                };
                Some(Rate {
                    kind,
                    law: RateLaw::Arrhenius { a: a_value, n, ea },
                    at_k: crate::units::constants::STANDARD_TEMPERATURE,
                    at_explicit: false,
                    loc,
                    dimension,
                })
            }
            _ => {
                let q = self.quantity(file, a)?;
                let (v, dim) = reader.read(q, Kind::Free, &a.name.text, &mut self.diags)?;
                if a.name.text == "k" && r.reversible() && q.unit.is_none() {
                    self.push(
                        Diagnostic::new(
                            "lowercase-k",
                            file,
                            a.name.span,
                            "a dimensionless `k` on a reversible reaction: `k` is a rate constant, `K` an equilibrium constant",
                        )
                        .with_help("write `K` for the equilibrium constant, or give `k` its rate unit")
                        .with_fix(Fix {
                            title: "write `K`".into(),
                            applicability: Applicability::Unsafe,
                            edits: vec![TextEdit { file, span: a.name.span, new_text: "K".into() }],
                        }),
                    );
                    return None;
                }
                let (at_k, at_explicit) = self.at(reader, q);
                Some(Rate {
                    kind,
                    law: RateLaw::Constant(v),
                    at_k,
                    at_explicit,
                    loc,
                    dimension: dim,
                })
            }
        }
    }

    /// Element, charge and third-body balance against the library's
    /// species `all`; true when balanced.
    fn check_balance_with(
        &mut self,
        file: FileId,
        eq: &ast::Equation,
        r: &Reaction,
        all: &[Species],
        rows: &ElementRows,
    ) -> bool {
        let third = |side: Side| {
            r.terms
                .iter()
                .filter(|t| t.side == side && rows.is_third_body(t.species.0))
                .count()
        };
        let (m_left, m_right) = (third(Side::Left), third(Side::Right));
        let mut ok = true;
        if (m_left > 0) != (m_right > 0) {
            let (present, missing) = if m_left > 0 {
                ("left", "right")
            } else {
                ("right", "left")
            };
            let at = r
                .terms
                .iter()
                .find(|t| all[t.species.0 as usize].formula.kind == SpeciesKind::ThirdBody)
                .map(|t| t.loc.span)
                .unwrap_or(eq.span);
            self.push(
                Diagnostic::new(
                    "third-body",
                    file,
                    at,
                    format!("the third body `M` is on the {present} side only"),
                )
                .with_help(format!("`M` is a collision partner that is never consumed: add `+ M` on the {missing} side")),
            );
            ok = false;
        }
        // Most equations balance with small coefficients: settle those on
        // the packed rows, and keep the exact path for the rest.
        let signed_coefficient = |t: &Term| match t.side {
            Side::Left => -t.coefficient,
            Side::Right => t.coefficient,
        };
        let packed = rows.balanced(r.terms.iter().map(|t| (t.species.0, signed_coefficient(t))));
        if packed == Some(true) {
            return ok;
        }
        let species: Vec<&crate::chem::formula::Formula> = r
            .terms
            .iter()
            .map(|t| &*all[t.species.0 as usize].formula)
            .collect();
        let signed: Vec<(Ratio<i64>, &crate::chem::formula::Formula)> = r
            .terms
            .iter()
            .zip(&species)
            .map(|(t, f)| (signed_coefficient(t), *f))
            .collect();
        // The rows' answers are exact: only an equation they could not
        // answer (a fraction, an overflow) may still balance.
        if packed.is_none() && crate::chem::balance::balanced_small(&signed) == Some(true) {
            return ok;
        }
        let res = residuals(&signed);
        let element_off: Vec<String> = res
            .elements
            .iter()
            .filter(|e| e.left != e.right)
            .map(|e| {
                let sym = crate::chem::elements::by_z(e.z)
                    .map(|x| x.symbol)
                    .unwrap_or("?");
                let diff = &e.right - &e.left;
                let (more, by) = if diff > num_rational::BigRational::from_integer(0.into()) {
                    ("right", diff)
                } else {
                    ("left", -diff)
                };
                format!(
                    "{sym}: {} on the left, {} on the right ({} more on the {more})",
                    e.left, e.right, by
                )
            })
            .collect();
        let charge_off = res.charge_left != res.charge_right;
        if element_off.is_empty() && !charge_off {
            return ok;
        }
        let fix = self.balance_fix(file, eq, &species);
        if !element_off.is_empty() {
            let message = if element_off.len() == 1 {
                format!("not balanced: {}", element_off[0])
            } else {
                format!("not balanced: {}", element_off.join("; "))
            };
            let mut d = Diagnostic::new("element-balance", file, eq.span, message);
            d = match &fix {
                Ok(f) => d
                    .with_help(format!("balanced: {}", f.edits[0].new_text))
                    .with_fix(f.clone()),
                Err(why) => d.with_help(why.clone()),
            };
            self.push(d);
        }
        if charge_off {
            let mut d = Diagnostic::new(
                "charge-balance",
                file,
                eq.span,
                format!(
                    "charge not balanced: {} on the left, {} on the right",
                    signed_charge(&res.charge_left),
                    signed_charge(&res.charge_right)
                ),
            );
            if element_off.is_empty() {
                d = match &fix {
                    Ok(f) => d
                        .with_help(format!("balanced: {}", f.edits[0].new_text))
                        .with_fix(f.clone()),
                    Err(why) => d.with_help(why.clone()),
                };
            } else {
                d = d.with_help("electrons (`e-`) count as charge -1");
            }
            self.push(d);
        }
        false
    }

    /// The equation rewritten with its unique smallest balance, or why none.
    fn balance_fix(
        &self,
        file: FileId,
        eq: &ast::Equation,
        species: &[&crate::chem::formula::Formula],
    ) -> Result<Fix, String> {
        // Third bodies and photons take no part in the balance.
        let n_left = eq.left.len();
        if species.len() > MAX_BALANCE_SPECIES {
            return Err(format!(
                "with {} species the equation is too long to search for a balance (at most {MAX_BALANCE_SPECIES})",
                species.len()
            ));
        }
        match balance(species, n_left) {
            BalanceOutcome::Unique(coefficients) => {
                let text = &self.ws.file(file).text;
                let arrow = &text[eq.arrow.span.range()];
                let balanced = balanced_text(eq, arrow, &coefficients);
                Ok(Fix {
                    title: "balance the equation".into(),
                    applicability: Applicability::Safe,
                    edits: vec![TextEdit {
                        file,
                        span: eq.span,
                        new_text: balanced,
                    }],
                })
            }
            BalanceOutcome::NotUnique { independent } => Err(format!(
                "these species admit {independent} independent balances, so no single one is offered; fix the coefficients by hand"
            )),
            BalanceOutcome::Impossible(why) => {
                let names = eq.species_names();
                Err(format!("no balance exists: {}", why.message(&names)))
            }
        }
    }

    fn mixture_statement(
        &mut self,
        file: FileId,
        reader: &UnitReader,
        s: &Statement,
        name: Option<&ast::Name>,
    ) {
        let Some(name) = name else { return };
        let mut m = Mixture {
            name: name.text.as_str().to_owned(),
            loc: Loc::new(file, s.span),
            temperature_k: None,
            pressure: None,
            volume: None,
            davies: false,
            entries: Vec::new(),
        };
        for a in &s.attributes {
            match a.name.text.as_str() {
                "temperature" => {
                    if let Some(q) = self.quantity(file, a) {
                        m.temperature_k = reader
                            .read(q, Kind::Temperature, "temperature", &mut self.diags)
                            .map(|x| x.0);
                    }
                }
                "pressure" => {
                    if let Some(q) = self.quantity(file, a) {
                        m.pressure = reader
                            .read(q, Kind::Pressure, "pressure", &mut self.diags)
                            .map(|x| x.0);
                    }
                }
                "volume" => {
                    if let Some(q) = self.quantity(file, a) {
                        m.volume = reader
                            .read(q, Kind::Volume, "volume", &mut self.diags)
                            .map(|x| x.0);
                    }
                }
                "activity" => match &a.value.kind {
                    ValueKind::Word(w) if w == "davies" => m.davies = true,
                    ValueKind::Word(w) if w == "ideal" => m.davies = false,
                    _ => self.push(
                        Diagnostic::new(
                            "syntax",
                            file,
                            a.value.span,
                            "`activity` is `ideal` or `davies`",
                        )
                        .with_help(
                            "`activity = davies` applies the Davies equation to aqueous ions",
                        ),
                    ),
                },
                text if mixture_names_species(&self.aliases, text) => {
                    let Some(species) = self.resolve(file, &a.name) else {
                        continue;
                    };
                    let Some(q) = self.quantity(file, a) else {
                        continue;
                    };
                    let Some((value, dim)) =
                        reader.read(q, Kind::MixtureAmount, text, &mut self.diags)
                    else {
                        continue;
                    };
                    let kind = super::quantity::amount_kind(dim);
                    if value < 0.0 {
                        self.push(Diagnostic::new(
                            "mixture",
                            file,
                            q.number_span,
                            format!("`{}` has a negative amount", truncate(text, 30)),
                        ));
                        continue;
                    }
                    if let Some(kind) = kind {
                        m.entries.push(MixtureEntry {
                            species,
                            name: text.to_string(),
                            kind,
                            value,
                            loc: Loc::new(file, a.span),
                            name_loc: Loc::new(file, a.name.span),
                        });
                    }
                }
                _ => {
                    let d = if a.name.text.chars().next().is_some_and(|c| c.is_lowercase())
                        && MIXTURE_ATTRIBUTES
                            .iter()
                            .all(|k| strsim::levenshtein(k, &a.name.text) > 3)
                    {
                        // A lowercase name that is no attribute: an undeclared alias.
                        self.report_unresolved(file, &a.name);
                        continue;
                    } else {
                        a
                    };
                    self.unknown_attribute(file, d, MIXTURE_ATTRIBUTES, "a mixture");
                }
            }
        }
        self.lib.mixtures.push(m);
    }
}

fn signed_charge(q: &num_rational::BigRational) -> String {
    let zero = num_rational::BigRational::from_integer(0.into());
    if *q > zero {
        format!("+{q}")
    } else {
        q.to_string()
    }
}
