//! A short tour: analyses a small-signal gain stage and prints the results.
//!
//! The stage is an invented scenario: a 12 V gain stage for a small
//! transducer, driving a 10 kΩ input.

use stagewright::{analyze, format_si, Stage};

fn main() -> Result<(), stagewright::Error> {
    // The crate documentation's example stage (its parts: Parts::example()).
    let stage = Stage::example();
    let a = analyze(&stage)?;
    let op = &a.operating_point;
    println!("common-emitter gain stage, 12 V, general-purpose small-signal NPN");
    println!("  region            {}", op.region.name());
    println!("  IC                {}", format_si(op.ic, "A"));
    println!("  VCE               {}", format_si(op.vce, "V"));
    println!("  voltage gain      {:.2}", a.midband.voltage_gain);
    println!(
        "  input impedance   {}",
        format_si(a.midband.input_impedance, "Ω")
    );
    println!(
        "  output impedance  {}",
        format_si(a.midband.output_impedance, "Ω")
    );
    if let Some(f) = a.bandwidth.f_low {
        println!("  lower corner      {}", format_si(f, "Hz"));
    }
    if let Some(f) = a.bandwidth.f_high {
        println!("  upper corner      {}", format_si(f, "Hz"));
    }
    println!(
        "  symmetric swing   {} peak",
        format_si(a.swing.symmetric, "V")
    );
    for c in &a.cautions {
        println!("  caution: {}", c.message);
    }
    Ok(())
}
