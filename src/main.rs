fn main() -> std::process::ExitCode {
    sheaf::cli::main()
}
