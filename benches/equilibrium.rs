//! Benchmark of the equilibrium solver on a 50-species, 30-reaction system
//! (the project's bar is under 1 ms per solve). The system is invented: 20
//! gaseous components and 30 products each formed from two or three of them,
//! two of the products solids, with constants spread over ten orders of
//! magnitude either way.

use criterion::{Criterion, criterion_group, criterion_main};
use stoik::equilibrium::{ActivityModel, Phase, Problem, Reaction, Species, Vessel, solve};

/// The allocator of the `stoik` binary, so that the figures are the ones
/// the command and the server give.
#[global_allocator]
static ALLOCATOR: mimalloc::MiMalloc = mimalloc::MiMalloc;

/// A small deterministic generator (64-bit LCG, Knuth's MMIX constants).
struct Lcg(u64);

impl Lcg {
    fn next(&mut self) -> f64 {
        self.0 = self
            .0
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        (self.0 >> 11) as f64 / (1u64 << 53) as f64
    }
}

fn system(with_solids: bool) -> Problem {
    let mut rng = Lcg(2026);
    let components = 20;
    let products = 30;
    let mut species: Vec<Species> = (0..components)
        .map(|k| Species {
            name: format!("C{k}(g)"),
            phase: Phase::Gas,
            charge: 0,
            initial_mol: 0.5 + rng.next(),
        })
        .collect();
    let mut reactions = Vec::new();
    for p in 0..products {
        let solid = with_solids && p < 2;
        let index = species.len();
        species.push(Species {
            name: format!("P{p}"),
            phase: if solid { Phase::Condensed } else { Phase::Gas },
            charge: 0,
            initial_mol: 0.0,
        });
        let parts = 2 + (rng.next() * 2.0) as usize;
        let mut stoich = vec![(index, 1.0)];
        for _ in 0..parts {
            let c = (rng.next() * components as f64) as usize % components;
            stoich.push((c, -1.0));
        }
        reactions.push(Reaction {
            label: format!("r{p}"),
            stoich,
            ln_k: (rng.next() * 20.0 - 10.0) * std::f64::consts::LN_10,
        });
    }
    Problem {
        species,
        reactions,
        temperature_k: 800.0,
        vessel: Vessel::ConstantVolume { volume_l: 10.0 },
        activity: ActivityModel::Ideal,
    }
}

fn bench(c: &mut Criterion) {
    for (name, with_solids) in [
        ("equilibrium_50x30_gas", false),
        ("equilibrium_50x30_with_solids", true),
    ] {
        let problem = system(with_solids);
        let s = solve(&problem);
        assert!(s.converged, "{name}: {:?}", s.why);
        c.bench_function(name, |b| b.iter(|| solve(std::hint::black_box(&problem))));
    }
}

criterion_group!(benches, bench);
criterion_main!(benches);
