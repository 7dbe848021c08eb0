//! The formatter runs in linear time: a 10 MB library formats in well under
//! a second in a release build. Run with
//! `cargo test --release --test format_perf -- --ignored`.

use std::time::Instant;
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
        if i % 50 == 0 {
            text.push_str("reaction broken  A <=>   B\n  K =  1\n");
        }
        i += 1;
    }
    text
}

#[test]
#[ignore = "timing; run in release"]
fn ten_megabytes_format_in_well_under_a_second() {
    let text = big_library(10 * 1024 * 1024);
    let start = Instant::now();
    let once = format(&text);
    let elapsed = start.elapsed();
    eprintln!("formatted {} bytes in {elapsed:?}", text.len());
    assert!(elapsed.as_secs_f64() < 1.0, "took {elapsed:?}");
    let start = Instant::now();
    assert_eq!(format(&once), once);
    eprintln!("formatted the formatted text in {:?}", start.elapsed());
}

#[test]
fn a_big_library_formats_whole() {
    let text = big_library(200 * 1024);
    let once = format(&text);
    assert_eq!(format(&once), once);
    assert_eq!(once.matches("reaction r").count(), text.matches("reaction   r").count());
    assert!(once.contains("reaction r7: CO(g) + H2O(g) <=> CO2(g) + H2(g)  # step 7\n  K      = 1.0e5 at 298.15 K\n"));
    assert!(once.contains("reaction broken  A <=>   B\n  K =  1\n"));
}
