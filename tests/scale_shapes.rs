//! The synthetic shapes the scale benchmark grows (`netmargin::synth::shape`), checked for what
//! they must find: the findings-dense board's rail suggestions come from the rails gathered once
//! per file (`checks::common::RailIndex`), which must give the same answer as looking through
//! every net (the first rail of the kind asked for, in file order).

use netmargin::analysis::Settings;
use netmargin::pipeline::outcome_of;
use netmargin::source::SourceFile;

fn findings(shape: &str, bytes: usize) -> Vec<netmargin::diag::Diag> {
    let text = netmargin::synth::shape(shape, bytes).expect("a known shape");
    let settings = Settings::builtin(&Default::default(), &Default::default());
    let (outcome, _) = outcome_of(SourceFile::from_string("board.net", text), &settings);
    assert!(outcome.fatal.is_none(), "{:?}", outcome.fatal);
    outcome.diags.to_vec()
}

#[test]
fn a_findings_dense_board_suggests_its_own_rails_for_every_part() {
    let diags = findings("dense", 40_000);
    let cells = diags.iter().filter(|d| d.code == "unpowered-part").count();
    assert!(cells >= 20, "{cells} unpowered parts");
    for d in diags.iter().filter(|d| d.code == "unpowered-part") {
        // every 74HC00 has pin 7 placed but alone and pin 14 on no net; the board's ground
        // rail is the last net, its +5V rail (5 V, the HC nominal supply) the one before it
        // (74HC00: GND pin 7, VCC pin 14, TI SN74HC00 data sheet pinout; document number
        // SCLS181 from memory)
        assert_eq!(
            d.help.as_deref(),
            Some("wire pin 7 (GND) to GND and pin 14 (VCC) to +5V (5.00 V)"),
            "{}",
            d.message
        );
    }
    let moved: Vec<_> = diags
        .iter()
        .filter(|d| d.code == "power-pin-miswired")
        .collect();
    assert_eq!(
        moved.len(),
        cells,
        "one 74LS04 per cell has VCC on a signal net"
    );
    for d in moved {
        // 74LS family: 4.75 V to 5.25 V (TI SN74LS04 data sheet, recommended operating
        // conditions; document number SDLS029 from memory)
        assert_eq!(
            d.help.as_deref(),
            Some("move it to +5V (5.00 V; the 74LS family runs from 4.75 V to 5.25 V)"),
            "{}",
            d.message
        );
    }
}
