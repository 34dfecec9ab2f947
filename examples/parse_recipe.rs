//! Parses and checks a recipe file and prints the diagnostics or the
//! canonical form: cargo run --example parse_recipe -- FILE [HEADER ...]
fn main() {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let Some(path) = args.first() else {
        eprintln!("usage: parse_recipe FILE [HEADER ...]");
        std::process::exit(2);
    };
    let source = std::fs::read_to_string(path).expect("readable recipe");
    let headers = args[1..].to_vec();
    let parsed =
        sheaf::recipe::parse_and_check(&source, (!headers.is_empty()).then_some(&headers[..]));
    if parsed.is_ok() {
        print!("{}", sheaf::recipe::pretty::recipe(&parsed.recipe));
    } else {
        eprint!(
            "{}",
            sheaf::recipe::render_all(&parsed.diagnostics, path, &source)
        );
        std::process::exit(2);
    }
}
