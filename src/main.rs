fn main() {
    eprintln!("sheaf: the command line arrives with the end-to-end work; the statistics core is in the library");
    std::process::exit(2);
}
