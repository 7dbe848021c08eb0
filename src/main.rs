//! The `stoik` binary: a thin shell over [`stoik::cli`].

fn main() {
    std::process::exit(stoik::cli::main());
}
