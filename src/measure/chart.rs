//! A plain-text chart of measured against predicted values, for terminals,
//! screen readers and logs: ASCII only, one string per line.
//!
//! `.` marks measured = predicted, `*` a batch, `X` a flagged batch (a batch on
//! the diagonal shows as `*`).

use super::compare::KindSummary;

/// Width of the left margin that holds the y-axis labels (characters).
const MARGIN: usize = 9;

/// Renders the summary's chart in `width` × `height` characters (at least 20 × 6).
/// Returns the lines, top first; an empty chart says so in one line.
pub fn render_chart(summary: &KindSummary, width: usize, height: usize) -> Vec<String> {
    if summary.chart.is_empty() {
        return vec![format!("{}: no batches to chart", summary.kind)];
    }
    let cols = width.max(20) - MARGIN;
    let rows = height.max(6) - 3;
    let values = summary.chart.iter().flat_map(|p| [p.predicted, p.measured]);
    let (mut lo, mut hi) = values.fold((f64::INFINITY, f64::NEG_INFINITY), |(lo, hi), v| {
        (lo.min(v), hi.max(v))
    });
    if hi - lo < 1e-9 {
        lo -= 0.5;
        hi += 0.5;
    }
    let col = |x: f64| (((x - lo) / (hi - lo)) * (cols - 1) as f64).round() as usize;
    let row = |y: f64| (((hi - y) / (hi - lo)) * (rows - 1) as f64).round() as usize;
    let mut grid = vec![vec![' '; cols]; rows];
    for (c, cell) in (0..cols).map(|c| (c, lo + (hi - lo) * c as f64 / (cols - 1) as f64)) {
        grid[row(cell).min(rows - 1)][c] = '.';
    }
    for p in &summary.chart {
        let (r, c) = (
            row(p.measured).min(rows - 1),
            col(p.predicted).min(cols - 1),
        );
        grid[r][c] = if p.flagged || grid[r][c] == 'X' {
            'X'
        } else {
            '*'
        };
    }
    let mut lines = vec![format!(
        "{}: measured (up) against predicted (across), n = {}; '.' measured = predicted, '*' batch, 'X' flagged",
        summary.kind, summary.n
    )];
    for (r, cells) in grid.iter().enumerate() {
        let label = match r {
            0 => format!("{hi:>8.2}"),
            r if r == rows - 1 => format!("{lo:>8.2}"),
            _ => " ".repeat(MARGIN - 1),
        };
        lines.push(format!("{label}|{}", cells.iter().collect::<String>()));
    }
    lines.push(format!("{}+{}", " ".repeat(MARGIN - 1), "-".repeat(cols)));
    let left = format!("{lo:.2}");
    let right = format!("{hi:.2}");
    let gap = cols.saturating_sub(left.len() + right.len());
    lines.push(format!(
        "{}{left}{}{right}",
        " ".repeat(MARGIN),
        " ".repeat(gap)
    ));
    lines
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::measure::compare::ChartPoint;

    fn summary(points: Vec<ChartPoint>) -> KindSummary {
        KindSummary {
            kind: "brix".into(),
            unit: "°Bx".into(),
            n: points.len(),
            bias: 0.0,
            rmse: 0.0,
            sd: None,
            standard_error: None,
            typical_difference: 0.0,
            batch_spread: 0.3,
            worst: Vec::new(),
            flagged: Vec::new(),
            chart: points,
        }
    }

    #[test]
    fn an_empty_chart_says_so() {
        assert_eq!(render_chart(&summary(Vec::new()), 40, 10).len(), 1);
    }

    #[test]
    fn a_point_on_the_diagonal_lands_on_it() {
        let s = summary(vec![
            ChartPoint {
                predicted: 20.0,
                measured: 20.0,
                flagged: false,
            },
            ChartPoint {
                predicted: 30.0,
                measured: 30.0,
                flagged: false,
            },
        ]);
        let lines = render_chart(&s, 30, 8);
        assert_eq!(lines.len(), 8);
        // Top row (measured 30) ends with the batch at predicted 30.
        assert!(lines[1].ends_with('*'), "{lines:?}");
        // Bottom plot row (measured 20) starts with the batch at predicted 20.
        assert!(lines[5].contains("|*"), "{lines:?}");
        assert!(
            lines
                .iter()
                .all(|l| l.chars().count() <= 30 || l.starts_with("brix"))
        );
    }
}
