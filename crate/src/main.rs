//! The `mixwell` command-line tool; all the work happens in the library.

#[cfg(not(target_arch = "wasm32"))]
fn main() -> std::process::ExitCode {
    mixwell::cli::main()
}

#[cfg(target_arch = "wasm32")]
fn main() {}
