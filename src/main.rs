//! The `lagfold` command: a thin shell over the library.

fn main() {
    std::process::exit(lagfold::cli::main());
}
