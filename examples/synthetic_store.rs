//! Writes a synthetic storeroom as inventory YAML, for trying `offgas audit` at scale.
//! Usage: cargo run --release --example synthetic_store -- CONTAINERS CABINETS [SEED] > store.yaml

use offgas::store::generate::{synthetic_store, to_yaml, StoreShape};

fn main() -> anyhow::Result<()> {
    let args: Vec<String> = std::env::args().collect();
    let number = |i: usize, default: u64| -> anyhow::Result<u64> {
        Ok(match args.get(i) {
            Some(a) => a.parse()?,
            None => default,
        })
    };
    let cat = offgas::embedded::catalog()?;
    let shape = StoreShape {
        containers: number(1, 1000)? as usize,
        cabinets: number(2, 20)? as usize,
        seed: number(3, 1)?,
        ..Default::default()
    };
    print!("{}", to_yaml(&cat, &synthetic_store(&cat, &shape)));
    Ok(())
}
