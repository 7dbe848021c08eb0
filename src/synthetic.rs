//! Synthetic reaction libraries of any size, for benchmarks and scale tests.
//!
//! Every species is a sum of a few invented "monomers" (compositions over C,
//! H, N and O) with an invented Gibbs energy of formation; every reaction
//! joins two species into their sum, `X + Y <=> XY`, with K derived from those
//! Gibbs energies. Because many pairs share a sum, the library is full of
//! reaction cycles whose K are mutually consistent, which exercises the cycle
//! check at scale. A chosen fraction of reactions gets a planted mistake (K
//! of the reverse reaction, or K squared). All data is invented.

use crate::units::constants::{GAS_CONSTANT, STANDARD_TEMPERATURE};
use std::fmt::Write as _;

/// What to generate.
#[derive(Clone, Debug)]
pub struct Recipe {
    pub reactions: usize,
    /// Fraction of reactions with a planted mistake, 0 to 1.
    pub mistakes: f64,
    /// How many files the reactions are spread over (plus a top file that
    /// uses them all and a file of species data).
    pub files: usize,
    pub seed: u64,
}

/// A generated library: (relative path, text) pairs; the first is the top.
pub struct Generated {
    pub files: Vec<(String, String)>,
    /// Reactions with a planted mistake.
    pub planted: usize,
    /// Reactions written: the number asked for, unless the pairs to join ran
    /// out first.
    pub reactions: usize,
}

/// A small deterministic generator (xorshift64*), so that libraries are the
/// same on every machine without a dependency.
struct Rng(u64);

impl Rng {
    fn next(&mut self) -> u64 {
        let mut x = self.0;
        x ^= x >> 12;
        x ^= x << 25;
        x ^= x >> 27;
        self.0 = x;
        x.wrapping_mul(0x2545_F491_4F6C_DD1D)
    }
    fn below(&mut self, n: usize) -> usize {
        (self.next() % n.max(1) as u64) as usize
    }
    fn unit(&mut self) -> f64 {
        (self.next() >> 11) as f64 / (1u64 << 53) as f64
    }
}

/// Composition counts over C, H, N, O.
type Composition = [u32; 4];

fn formula(c: &Composition) -> String {
    let mut out = String::new();
    for (sym, n) in ["C", "H", "N", "O"].iter().zip(c) {
        match n {
            0 => {}
            1 => out.push_str(sym),
            n => {
                let _ = write!(out, "{sym}{n}");
            }
        }
    }
    out
}

/// Generate a library by a recipe.
pub fn generate(recipe: &Recipe) -> Generated {
    let mut rng = Rng(recipe.seed.max(1));
    // Monomers: small invented fragments with invented Gibbs energies (J/mol).
    let monomer_count = 24;
    let mut monomers: Vec<(Composition, f64)> = Vec::new();
    while monomers.len() < monomer_count {
        let c = [
            rng.below(3) as u32,
            1 + rng.below(4) as u32,
            rng.below(2) as u32,
            rng.below(3) as u32,
        ];
        if monomers.iter().any(|(m, _)| *m == c) {
            continue;
        }
        monomers.push((c, -200e3 + 300e3 * rng.unit()));
    }
    // Species are sums of up to `depth` monomers, identified by composition.
    let mut species: std::collections::HashMap<Composition, f64> = std::collections::HashMap::new();
    let gibbs = |species: &mut std::collections::HashMap<Composition, f64>,
                 c: Composition,
                 g: f64| { *species.entry(c).or_insert(g) };
    let add =
        |a: &Composition, b: &Composition| [a[0] + b[0], a[1] + b[1], a[2] + b[2], a[3] + b[3]];
    let rt = GAS_CONSTANT * STANDARD_TEMPERATURE;
    let per_file = recipe.reactions.div_ceil(recipe.files.max(1));
    let mut bodies: Vec<String> = vec![String::new(); recipe.files.max(1)];
    let mut planted = 0;
    // The pool of species to combine grows as reactions make new ones.
    let mut pool: Vec<Composition> = monomers.iter().map(|(c, _)| *c).collect();
    for (c, g) in &monomers {
        gibbs(&mut species, *c, *g);
    }
    let pool_limit = recipe.reactions.max(64);
    let mut in_pool: std::collections::HashSet<Composition> = pool.iter().copied().collect();
    // Species joining the pool have fewer atoms than this, so that sums
    // collide often; once nearly every pair of the pool has been used (a
    // long run of repeats), the bound is raised, so that a library of any
    // size can be made.
    let mut atoms_below = 40;
    let mut repeats = 0;
    let mut seen: std::collections::HashSet<(Composition, Composition)> =
        std::collections::HashSet::new();
    let mut i = 0;
    let mut attempts = 0usize;
    while i < recipe.reactions && attempts < recipe.reactions.saturating_mul(50) + 1000 {
        attempts += 1;
        let x = pool[rng.below(pool.len())];
        // Combine with a monomer, so that sums stay small and collide often.
        let (y, _) = monomers[rng.below(monomers.len())];
        // Each pair once: the same reaction twice would be a duplicate.
        let pair = if x <= y { (x, y) } else { (y, x) };
        if !seen.insert(pair) {
            repeats += 1;
            if repeats == REPEATS_BEFORE_LARGER_SPECIES {
                atoms_below += 1;
                repeats = 0;
            }
            continue;
        }
        repeats = 0;
        let z = add(&x, &y);
        let gx = species[&x];
        let gy = species[&y];
        let gz_default = gx + gy - 50e3 + 100e3 * rng.unit();
        let gz = gibbs(&mut species, z, gz_default);
        if pool.len() < pool_limit && z.iter().sum::<u32>() < atoms_below && in_pool.insert(z) {
            pool.push(z);
        }
        let mut ln_k = -(gz - gx - gy) / rt;
        let mistake = rng.unit() < recipe.mistakes;
        if mistake {
            planted += 1;
            ln_k = if rng.below(2) == 0 { -ln_k } else { 2.0 * ln_k };
        }
        let body = &mut bodies[i / per_file];
        let (fx, fy, fz) = (formula(&x), formula(&y), formula(&z));
        let lhs = if x == y {
            format!("2 {fx}(g)")
        } else {
            format!("{fx}(g) + {fy}(g)")
        };
        let _ = writeln!(
            body,
            "reaction r{i}: {lhs} <=> {fz}(g)\n  K = {:.6e} at 298.15 K{}",
            ln_k.exp(),
            if mistake { "  # planted" } else { "" }
        );
        i += 1;
    }
    let mut files = Vec::new();
    let mut top = String::from(
        "# Synthetic library, invented data for benchmarks; do not use for design.\nuse \"species.stoik\"\n",
    );
    for i in 0..bodies.len() {
        let _ = writeln!(top, "use \"part{i}.stoik\"");
    }
    files.push(("library.stoik".to_string(), top));
    let mut data = String::from("# Invented formation data of the monomers.\n");
    for (c, g) in &monomers {
        let _ = writeln!(
            data,
            "species {}(g)\n  dGf = {:.3} kJ/mol",
            formula(c),
            g / 1000.0
        );
    }
    files.push(("species.stoik".to_string(), data));
    for (i, b) in bodies.into_iter().enumerate() {
        files.push((
            format!("part{i}.stoik"),
            format!("# Synthetic part {i}, invented data.\n{b}"),
        ));
    }
    Generated {
        files,
        planted,
        reactions: i,
    }
}

/// Repeated pairs in a row after which larger species may join the pool.
const REPEATS_BEFORE_LARGER_SPECIES: usize = 64;

/// The one-file library of the language server's edit benchmark: invented,
/// distinct reactions (dehydrogenations with K and dH, chlorinations with
/// Arrhenius rate constants) and a mixture.
pub fn edit_benchmark_library(reactions: usize) -> String {
    let mut s = String::from("units energy = kJ/mol, temperature = K\n\n");
    for i in 0..reactions {
        let n = i / 2 + 1;
        if i % 2 == 0 {
            s.push_str(&format!(
                "reaction d{n}: C{n}H{}(g) <=> C{n}H{}(g) + H2(g)\n  K = 1.0e-3 at 700 K\n  dH = 120.5 kJ/mol\n",
                2 * n + 2,
                2 * n
            ));
        } else {
            s.push_str(&format!(
                "reaction c{n}: C{n}H{}(g) + Cl2(g) -> C{n}H{}Cl(g) + HCl(g)\n  k = arrhenius(A = 1.0e9 L/(mol*s), n = 0, Ea = 10 kJ/mol)\n",
                2 * n + 2,
                2 * n + 1
            ));
        }
    }
    s.push_str("\nmixture feed\n  temperature = 800 K\n  C1H4(g) = 1 mol/L\n  C1H2(g) = 0 mol/L\n  H2(g) = 0 mol/L\n");
    s
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Past the 857,964 reactions the first bound on pooled species allowed,
    /// the library still has as many reactions as asked for, each pair of
    /// species joined once.
    #[test]
    fn a_large_library_has_the_reactions_asked_for() {
        let asked = 900_000;
        let generated = generate(&Recipe {
            reactions: asked,
            mistakes: 0.0,
            files: 1,
            seed: 42,
        });
        assert_eq!(generated.reactions, asked);
        let written = generated
            .files
            .iter()
            .map(|(_, text)| text.matches("\nreaction r").count())
            .sum::<usize>();
        assert_eq!(written, asked);
    }
}
