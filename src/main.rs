//! The pvhazard binary: parse, compute, print, exit with a documented code.
//!
//! Exit codes: 0 computed (with or without cautions), 1 internal failure, 2 bad input.

fn main() {
    let code = pvhazard::cli::run(std::env::args_os(), &mut std::io::stdout().lock());
    std::process::exit(code);
}
