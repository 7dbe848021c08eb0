//! Write a synthetic reaction library: `cargo run --release --example
//! generate_library -- DIR REACTIONS [MISTAKE_FRACTION] [FILES] [SEED]`.

use std::path::PathBuf;

fn main() {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let Some(dir) = args.first().map(PathBuf::from) else {
        eprintln!("usage: generate_library DIR REACTIONS [MISTAKE_FRACTION] [FILES] [SEED]");
        std::process::exit(2);
    };
    let reactions = args.get(1).and_then(|s| s.parse().ok()).unwrap_or(10_000);
    let mistakes = args.get(2).and_then(|s| s.parse().ok()).unwrap_or(0.01);
    let files = args.get(3).and_then(|s| s.parse().ok()).unwrap_or(4);
    let generated = stoik::synthetic::generate(&stoik::synthetic::Recipe {
        reactions,
        mistakes,
        files,
        seed: args.get(4).and_then(|s| s.parse().ok()).unwrap_or(42),
    });
    if let Err(e) = std::fs::create_dir_all(&dir) {
        eprintln!("error: {}: {e}", dir.display());
        std::process::exit(2);
    }
    let mut bytes = 0;
    for (name, text) in &generated.files {
        bytes += text.len();
        if let Err(e) = std::fs::write(dir.join(name), text) {
            eprintln!("error: {name}: {e}");
            std::process::exit(2);
        }
    }
    eprintln!(
        "wrote {} files, {} reactions, {bytes} bytes, {} planted mistakes, top file {}",
        generated.files.len(),
        generated.reactions,
        generated.planted,
        dir.join("library.stoik").display()
    );
}
