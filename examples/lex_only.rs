//! Read and lex files without analysing them: the baseline that
//! `benches/compare.sh` times `stoik check` against.

fn main() {
    let mut tokens = 0usize;
    let mut bytes = 0usize;
    for path in std::env::args().skip(1) {
        match std::fs::read(&path) {
            Ok(b) => {
                bytes += b.len();
                let text = String::from_utf8_lossy(&b);
                tokens += stoik::syntax::lexer::lex(&text).len();
            }
            Err(e) => {
                eprintln!("error: {path}: {e}");
                std::process::exit(2);
            }
        }
    }
    println!("{bytes} bytes, {tokens} tokens");
}
