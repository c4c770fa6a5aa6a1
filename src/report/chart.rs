//! A small chart of the frozen share of water against temperature, drawn with
//! plain text characters so it survives any terminal, pipe or printer.

use crate::analysis::Analysis;

use crate::model::TempUnit;

/// Rows of the chart: frozen share from 100 % at the top to 0 % at the bottom.
const ROWS: usize = 10;

/// The chart as lines of text: one column per curve point from 0 to -40 °C
/// every 1 K, a `*` where the curve lies, and an axis below.
pub fn frozen_share_chart(a: &Analysis, unit: TempUnit) -> Vec<String> {
    let points: Vec<_> = a.ice_curve.iter().step_by(2).collect();
    let mut lines = Vec::with_capacity(ROWS + 3);
    for row in 0..=ROWS {
        let level = 1.0 - row as f64 / ROWS as f64;
        let label = if row % 5 == 0 {
            format!("{:>4.0} % |", 100.0 * level)
        } else {
            "       |".to_string()
        };
        let cells: String = points
            .iter()
            .map(|p| {
                let r = ((1.0 - p.frozen_fraction) * ROWS as f64).round() as usize;
                if r == row {
                    '*'
                } else if row == ROWS {
                    '_'
                } else {
                    ' '
                }
            })
            .collect();
        lines.push(format!("{label}{cells}"));
    }
    let n = points.len();
    let axis: String = (0..n)
        .map(|k| if k % 10 == 0 { '|' } else { ' ' })
        .collect();
    let mut labels = String::new();
    for k in (0..n).step_by(10) {
        let text = format!("{:.0}", unit.from_c(points[k].temp_c) + 0.0);
        labels.push_str(&format!("{text:<10}"));
    }
    lines.push(format!("       {axis}"));
    lines.push(format!("       {}{}", labels.trim_end(), unit.symbol()));
    lines
}
