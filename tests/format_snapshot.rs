//! A snapshot of a whole demo library after formatting, so that any change
//! in the layout shows up in review as a change in this text.

use stoik::format::format;

/// An invented demo: a small water-gas and ammonia library written the way
/// files look after years of hand edits.
const DEMO: &str = "\
# Invented demo library: syngas and ammonia loop (demo data only)   


units energy=kJ/mol,temperature = K
use  \"thermo/common.stoik\"

species   ammonia = NH3(g)
	dHf = -45.90 kJ/mol # standard enthalpy of formation
    dGf=-16.37 kJ/mol
  S = 192.77 J/(mol*K)      # standard molar entropy
  source =  \"invented for this demo\"
species Cu²⁺(aq) ; dGf = 65.5 kJ/mol



reaction shift:CO(g)+ H2O(g) <=> CO2(g) + H2(g)
reaction   shift2 :  CO(g)  +  H2O(g)  ⇌  CO2(g)  +  H2(g)   # the same, tidy
   K = 1.0e5   at 298.15 K
   dH = -41.2 kJ/mol
   # rate data below
   kf   = arrhenius(A=2e8 1/s,n=0,Ea=60 kJ/mol)

reaction synth:N2(g) + 3 H2(g) → 2NH3(g) ; k = 1e-3 1/s
mixture   feed
  temperature = 700 K
  N2(g) = 1.0 mol/L
  H2(g)   =   3.0 mol/L
  ammonia = 0 mol/L   
";

#[test]
fn the_demo_library_formats_as_recorded() {
    insta::assert_snapshot!(format(DEMO));
}
