//! What a K model reads of each species, packed by species id.
//!
//! Gathering the K sources of a reaction reads, for every species, its
//! standard state (from its formula) and its formation data (from its
//! declaration): two or three heap allocations per species, scattered over
//! a large library's memory, read again for every reaction that names the
//! species. The checks gather the sources of every reaction of a library;
//! they read these facts from one array instead, made once.

use super::{Standard, is_proton, standard_of_formula, zero_by_convention};
use crate::chem::formula::SpeciesKind;
use crate::model::{Library, Species, SpeciesId};

/// The facts of one species.
#[derive(Clone, Copy, Debug, PartialEq)]
pub struct Facts {
    pub standard: Standard,
    /// False for third bodies and photons, which no formation sum counts.
    pub counted: bool,
    /// ΔfH° and ΔfG° are zero by convention (reference elements, H+(aq),
    /// the electron) when not stated.
    pub zero_formation: bool,
    /// S° is zero by convention (the electron, H+(aq)) when not stated.
    pub zero_entropy: bool,
    /// Cp° is zero by convention (the electron) when not stated.
    pub zero_heat_capacity: bool,
    /// A heat capacity is stated, or none is needed (not a compound).
    pub heat_capacity_known: bool,
    pub dhf: Option<f64>,
    pub dgf: Option<f64>,
    pub s: Option<f64>,
    pub cp: Option<f64>,
}

impl Facts {
    pub fn of(sp: &Species) -> Facts {
        let f = &sp.formula;
        let d = sp.data();
        Facts {
            standard: standard_of_formula(f),
            counted: !matches!(f.kind, SpeciesKind::ThirdBody | SpeciesKind::Photon),
            zero_formation: zero_by_convention(sp),
            zero_entropy: f.kind == SpeciesKind::Electron || is_proton(sp),
            zero_heat_capacity: f.kind == SpeciesKind::Electron,
            heat_capacity_known: d.cp.is_some() || f.kind != SpeciesKind::Compound,
            dhf: d.dhf.map(|x| x.value),
            dgf: d.dgf.map(|x| x.value),
            s: d.s.map(|x| x.value),
            cp: d.cp.map(|x| x.value),
        }
    }
}

/// The facts of every species of a library, by species id.
pub struct FactsTable {
    facts: Vec<Facts>,
}

impl FactsTable {
    pub fn of(lib: &Library) -> FactsTable {
        FactsTable {
            facts: lib.species.iter().map(Facts::of).collect(),
        }
    }

    pub fn get(&self, id: SpeciesId) -> Facts {
        self.facts[id.0 as usize]
    }
}

#[cfg(test)]
mod tests {
    use crate::reaction_k::ReactionK;

    /// The K model of every reaction of the examples (gases, solutes,
    /// solids, electrons, formation data, heat capacities) is the same
    /// from the table as from facts read off each species when asked (the
    /// facts themselves are checked through the K values of the report,
    /// hover and fixture tests, against published data).
    #[test]
    fn packed_facts_give_the_models_the_species_give() {
        let root = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("examples");
        let mut ws = crate::workspace::Workspace::new(&root);
        let mut files = Vec::new();
        for dir in std::fs::read_dir(&root).expect("the examples folder") {
            let dir = dir.expect("an entry").path();
            if dir.is_dir() {
                for f in std::fs::read_dir(&dir).expect("an example folder") {
                    let f = f.expect("an entry").path();
                    if f.extension().is_some_and(|e| e == "stoik") {
                        files.push(f);
                    }
                }
            }
        }
        for f in &files {
            ws.load(f, &crate::workspace::Overlay::default())
                .expect("an example loads");
        }
        let analysis = crate::analysis::analyze(ws, &crate::config::Config::default());
        let mut compared = 0;
        for l in &analysis.libraries {
            let table = super::FactsTable::of(&l.library);
            for r in &l.library.reactions {
                let one = format!("{:?}", ReactionK::of(&l.library, r));
                let packed = format!("{:?}", ReactionK::of_packed(r, &table));
                assert_eq!(one, packed);
                compared += 1;
            }
        }
        assert!(compared > 50, "{compared} reactions");
    }
}
