//! Library-wide checks: units of constants, the thermodynamic consistency
//! of K within a reaction, between reactions (reverse, multiple, cycle) and
//! across temperatures.
//!
//! Reactions that failed element or charge balance, or whose species could
//! not be read, take part in none of these checks, so one error does not
//! cascade into a dozen warnings.

mod consistency;
mod cycles;
mod pairs;
mod rates;

use crate::chem::cycles::CanonicalKey;
use crate::config::Config;
use crate::diagnostic::Diagnostic;
use crate::model::{Library, SpeciesId};
use crate::reaction_k::ReactionK;
use crate::workspace::Workspace;
use num_rational::Ratio;
use std::sync::Arc;

/// One reaction prepared for checking.
pub(crate) struct Checked<'l> {
    pub reaction: &'l crate::model::Reaction,
    pub k: ReactionK,
}

/// The tolerance on ln K around `reference` for a relative tolerance.
pub(crate) fn tolerance(reference: f64, rel: f64) -> f64 {
    rel * reference
        .abs()
        .max(crate::thermo::likely_cause::LN_K_SCALE_FLOOR)
}

/// A number for messages: 4 significant figures, scientific when large.
pub fn number(x: f64) -> String {
    if x == 0.0 {
        return "0".into();
    }
    let a = x.abs();
    if x.fract() == 0.0 && a < 1e5 {
        // Integers (multipliers, most temperatures) need no rounding.
        return format!("{}", x as i64);
    }
    if (1e-3..1e5).contains(&a) {
        let digits = (3 - a.log10().floor() as i32).max(0) as usize;
        let s = format!("{x:.digits$}");
        if s.contains('.') {
            s.trim_end_matches('0').trim_end_matches('.').to_string()
        } else {
            s
        }
    } else {
        format!("{x:.3e}")
    }
}

/// A temperature for messages: up to two decimals (`298.15`, `700`).
pub fn temperature(t: f64) -> String {
    let s = format!("{t:.2}");
    s.trim_end_matches('0').trim_end_matches('.').to_string()
}

/// K from ln K for messages, without overflowing.
pub fn k_text(ln_k: f64) -> String {
    if ln_k.is_nan() {
        return "NaN".into();
    }
    if ln_k.is_infinite() {
        return if ln_k > 0.0 { "infinity" } else { "0" }.into();
    }
    let log10 = ln_k / std::f64::consts::LN_10;
    if log10.abs() < 300.0 {
        number(ln_k.exp())
    } else if log10.abs() < 1e15 {
        let mut e = log10.floor();
        let mut mantissa = 10f64.powf(log10 - e);
        // A mantissa that rounds up to 10 moves to the next power.
        if (mantissa * 1000.0).round() >= 10_000.0 {
            mantissa /= 10.0;
            e += 1.0;
        }
        format!("{mantissa:.3}e{}", e as i64)
    } else {
        // Past 10^(10^15) the mantissa is lost in the exponent's rounding:
        // say the power of ten itself.
        format!("10^({})", number(log10))
    }
}

/// Phase timings on stderr when `STOIK_PROFILE` is set, for profiling
/// large libraries.
pub struct Phases {
    on: bool,
    /// When the last phase ended; behind a lock, so that a phase may end
    /// on any of the threads an analysis runs on.
    at: std::sync::Mutex<std::time::Instant>,
}

impl Phases {
    pub fn start() -> Phases {
        Phases {
            on: std::env::var_os("STOIK_PROFILE").is_some(),
            at: std::sync::Mutex::new(std::time::Instant::now()),
        }
    }

    pub fn mark(&self, what: &str) {
        if self.on {
            let now = std::time::Instant::now();
            let mut at = self
                .at
                .lock()
                .unwrap_or_else(std::sync::PoisonError::into_inner);
            eprintln!(
                "profile: {what}: {:.3} s, resident {} MB (peak {} MB)",
                (now - *at).as_secs_f64(),
                memory_mb("VmRSS:"),
                memory_mb("VmHWM:")
            );
            *at = now;
        }
    }
}

/// A memory figure of this process from `/proc/self/status` in MB (0
/// where the system has no such file).
fn memory_mb(field: &str) -> u64 {
    std::fs::read_to_string("/proc/self/status")
        .ok()
        .and_then(|s| {
            s.lines()
                .find(|l| l.starts_with(field))
                .and_then(|l| l.split_whitespace().nth(1))
                .and_then(|kb| kb.parse::<u64>().ok())
        })
        .map_or(0, |kb| kb / 1024)
}

pub use cycles::CycleMemo;

/// The net vectors of reactions as a check saw them, flattened into one
/// list, so that the next check of an edited library tells cheaply which
/// reactions are unchanged.
#[derive(Default)]
pub(crate) struct Nets {
    entries: Vec<(u32, Ratio<i64>)>,
    /// Where each reaction's entries end.
    ends: Vec<u32>,
}

impl Nets {
    fn with_capacity(reactions: usize) -> Nets {
        Nets {
            entries: Vec::with_capacity(4 * reactions),
            ends: Vec::with_capacity(reactions),
        }
    }

    fn push(&mut self, net: &[(SpeciesId, Ratio<i64>)]) {
        self.entries.extend(net.iter().map(|&(s, x)| (s.0, x)));
        self.ends.push(self.entries.len() as u32);
    }

    fn len(&self) -> usize {
        self.ends.len()
    }

    /// True when reaction `i` was seen with exactly `net`.
    fn same(&self, i: usize, net: &[(SpeciesId, Ratio<i64>)]) -> bool {
        let Some(&end) = self.ends.get(i) else {
            return false;
        };
        let start = if i == 0 { 0 } else { self.ends[i - 1] as usize };
        let seen = &self.entries[start..end as usize];
        seen.len() == net.len()
            && seen
                .iter()
                .zip(net)
                .all(|(a, b)| a.0 == b.0.0 && a.1 == b.1)
    }
}

/// What the checks of one analysis keep for the next, in the language
/// server: the pair keys of the reactions checked, with their net vectors,
/// and the cycle check's memo.
#[derive(Default)]
pub struct ChecksMemo {
    nets: Arc<Nets>,
    keys: Arc<Vec<Option<CanonicalKey>>>,
    cycles: Option<CycleMemo>,
}

/// Run every library-wide check.
pub fn run(ws: &Workspace, lib: &Library, config: &Config) -> Vec<Diagnostic> {
    run_with(ws, lib, config, None).0
}

/// [`run`] for the language server, which checks the same library again
/// after every edit: the checks keep a memo, and start from `last` (the
/// memo of the last analysis) where that still holds: the pair keys when
/// no reaction's net vector changed, the cycle check from the first
/// reaction that changed.
pub fn run_after(
    ws: &Workspace,
    lib: &Library,
    config: &Config,
    last: Option<&ChecksMemo>,
) -> (Vec<Diagnostic>, ChecksMemo) {
    let (out, memo) = run_with(ws, lib, config, Some(last));
    // A run with memory always returns its memo.
    (out, memo.unwrap_or_default())
}

fn run_with(
    ws: &Workspace,
    lib: &Library,
    config: &Config,
    memory: Option<Option<&ChecksMemo>>,
) -> (Vec<Diagnostic>, Option<ChecksMemo>) {
    let mut out = Vec::new();
    let prep = Phases::start();
    let ready: Vec<&crate::model::Reaction> = lib
        .reactions
        .iter()
        .filter(|r| r.complete && r.balanced)
        .collect();
    let facts = crate::reaction_k::FactsTable::of(lib);
    let checked = on_every_core(&ready, |reaction| Checked {
        reaction,
        k: ReactionK::of_packed(reaction, &facts),
    });
    prep.mark("K models");
    // The pair keys: the last ones when no reaction's net vector changed,
    // else made on every core (with the vectors, for the next analysis,
    // when the run keeps a memo).
    let unchanged = memory.flatten().filter(|m| {
        m.nets.len() == checked.len()
            && checked
                .iter()
                .enumerate()
                .all(|(i, c)| m.nets.same(i, c.reaction.net()))
    });
    let (nets, keys) = match unchanged {
        Some(m) => (Arc::clone(&m.nets), Arc::clone(&m.keys)),
        None => {
            let mut nets = Nets::default();
            if memory.is_some() {
                nets = Nets::with_capacity(checked.len());
                for c in &checked {
                    nets.push(c.reaction.net());
                }
            }
            (
                Arc::new(nets),
                Arc::new(on_every_core(&checked, pairs::key)),
            )
        }
    };
    // The cycle check, the longest, runs on this thread while the pair
    // grouping and the per-reaction, temperature and mixture checks run on
    // another; the findings keep the order they have always had: per
    // reaction, temperatures, mixtures, pairs, cycles.
    let clock = Phases::start();
    let others = || {
        // Timed apart, for `STOIK_PROFILE`: it ends before the cycles do.
        let beside = Phases::start();
        let mut found = Vec::new();
        for c in &checked {
            rates::check(lib, c, &mut found);
            if c.reaction.reversible() {
                consistency::check(ws, lib, c, config.tolerance, &mut found);
            }
        }
        consistency::temperatures(ws, lib, &checked, &mut found);
        for m in &lib.mixtures {
            found.extend(crate::solve::mixture_diagnostics(lib, m));
        }
        pairs::check(ws, &checked, &keys, config.tolerance, &mut found);
        beside.mark("per-reaction, mixture and pair checks (beside the cycles)");
        found
    };
    let cycles = || {
        let mut found = Vec::new();
        let memo = cycles::check(
            ws,
            &checked,
            config.tolerance,
            memory.map(|last| last.and_then(|m| m.cycles.as_ref())),
            &mut found,
        );
        clock.mark("cycles");
        (found, memo)
    };
    let ((cycles, memo), others) = crate::parallel::both(cycles, others);
    clock.mark("both checks done");
    out.extend(others);
    out.extend(cycles);
    let memo = memory.map(|_| ChecksMemo {
        nets,
        keys,
        cycles: memo,
    });
    (out, memo)
}

/// `f` over `items`, in order, split across the cores.
fn on_every_core<'a, T: Sync, R: Send>(
    items: &'a [T],
    f: impl Fn(&'a T) -> R + Sync + Send,
) -> Vec<R> {
    let cores = crate::parallel::cores();
    if cores < 2 || items.len() < 4096 {
        return items.iter().map(f).collect();
    }
    crate::parallel::map_in_order(items, items.len().div_ceil(cores), f)
}

#[cfg(test)]
mod tests {
    use super::k_text;

    #[test]
    fn k_text_spells_every_size() {
        assert_eq!(k_text(0.0), "1");
        assert_eq!(k_text(2000.0 * std::f64::consts::LN_10), "1.000e2000");
        assert_eq!(k_text(-2000.0 * std::f64::consts::LN_10), "1.000e-2000");
        // dGf = -1e300 kJ/mol gives ln K of about 4e302 at 298.15 K.
        assert_eq!(k_text(4.0e302), "10^(1.737e302)");
        assert_eq!(k_text(-4.0e302), "10^(-1.737e302)");
        assert_eq!(k_text(f64::INFINITY), "infinity");
        assert_eq!(k_text(f64::NEG_INFINITY), "0");
        assert_eq!(k_text(f64::NAN), "NaN");
    }
}
