//! The formatter keeps a big, messy library whole and formats it to a fixed
//! point. Its speed is measured by `cargo bench --bench library -- format`,
//! never by a timed test.

use stoik::format::format;

/// About `bytes` of a messy invented library: untidy statements, tidy ones,
/// comments, blank runs and a broken statement now and then.
fn big_library(bytes: usize) -> String {
    let mut text = String::with_capacity(bytes + 1024);
    let mut i = 0usize;
    while text.len() < bytes {
        text.push_str(&format!(
            "reaction   r{i} :CO(g) +  H2O(g)<=>CO2(g) + H2(g)   # step {i}\n\tK=1.0e5  at 298.15 K\n  dH = -41.2 kJ/mol\n    source = \"demo\"\n\n\n"
        ));
        text.push_str(&format!(
            "species s{i} = C2H5OH(l)\n  dHf    = -277.6 kJ/mol\n  S      = 160.7 J/(mol*K)  # demo\n"
        ));
        if i.is_multiple_of(50) {
            text.push_str("reaction broken  A <=>   B\n  K =  1\n");
        }
        i += 1;
    }
    text
}

#[test]
fn a_big_library_formats_whole() {
    let text = big_library(200 * 1024);
    let once = format(&text);
    assert_eq!(format(&once), once);
    assert_eq!(
        once.matches("reaction r").count(),
        text.matches("reaction   r").count()
    );
    assert!(once.contains(
        "reaction r7: CO(g) + H2O(g) <=> CO2(g) + H2(g)  # step 7\n  K      = 1.0e5 at 298.15 K\n"
    ));
    assert!(once.contains("reaction broken  A <=>   B\n  K =  1\n"));
}
