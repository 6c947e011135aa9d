//! Pictures as SVG (plotters): the counts of classes by signature against X with the main
//! terms of the asymptotic count and the ratio panel (`qorbits plot`, the release page), and
//! the average size of the 2-Selmer group against Y with its limit (`selmer-stats --plot`).

use plotters::coord::Shift;
use plotters::prelude::*;
use qorbits::error::Error;
use qorbits::table::stats::main_term;

/// Size of every picture, in pixels.
pub const SIZE: (u32, u32) = (1000, 760);

fn drawing<E: std::fmt::Display>(e: E) -> Error {
    Error::Io(format!("cannot draw the picture: {e}"))
}

/// The grid and the axis descriptions of a chart (a macro: the coordinate types differ).
macro_rules! mesh {
    ($chart:expr, $x:expr, $y:expr) => {
        $chart
            .configure_mesh()
            .x_desc($x)
            .y_desc($y)
            .label_style(("sans-serif", 14))
            .draw()
            .map_err(drawing)?
    };
}

/// An SVG picture of [`SIZE`] with a title, drawn by `draw` on the area below the title.
fn picture(
    title: &str,
    draw: impl FnOnce(&DrawingArea<SVGBackend<'_>, Shift>) -> Result<(), Error>,
) -> Result<String, Error> {
    let mut svg = String::new();
    {
        let root = SVGBackend::with_string(&mut svg, SIZE).into_drawing_area();
        root.fill(&WHITE).map_err(drawing)?;
        let root = root.titled(title, ("sans-serif", 20)).map_err(drawing)?;
        draw(&root)?;
        root.present().map_err(drawing)?;
    }
    Ok(svg)
}

/// The legend box of a chart, at `pos`.
fn legend<'a, DB: DrawingBackend + 'a, CT: CoordTranslate>(
    chart: &mut ChartContext<'a, DB, CT>,
    pos: SeriesLabelPosition,
) -> Result<(), Error> {
    chart
        .configure_series_labels()
        .position(pos)
        .background_style(WHITE.mix(0.9))
        .border_style(BLACK)
        .label_font(("sans-serif", 14))
        .draw()
        .map_err(drawing)
}

/// A solid line of width 2 with its legend entry.
fn solid<'a, DB: DrawingBackend + 'a, X: Ranged<ValueType = f64>, Y: Ranged<ValueType = f64>>(
    chart: &mut ChartContext<'a, DB, Cartesian2d<X, Y>>,
    pts: Vec<(f64, f64)>,
    c: RGBColor,
    label: String,
) -> Result<(), Error> {
    chart
        .draw_series(LineSeries::new(pts, c.stroke_width(2)))
        .map_err(drawing)?
        .label(label)
        .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 24, y)], c.stroke_width(2)));
    Ok(())
}

/// `n` points from `lo` to `hi`, evenly spaced on a log scale.
pub fn log_grid(lo: f64, hi: f64, n: usize) -> Vec<f64> {
    (0..n)
        .map(|k| lo * (hi / lo).powf(k as f64 / (n - 1) as f64))
        .collect()
}

const SIGNATURES: [(u8, &str); 3] = [
    (4, "4 real roots"),
    (2, "2 real roots"),
    (0, "0 real roots"),
];

fn colour(k: usize) -> RGBColor {
    [
        RGBColor(31, 119, 180),
        RGBColor(214, 39, 40),
        RGBColor(44, 160, 44),
    ][k]
}

/// The counts by signature against X (log axes) with the main terms, and below them the
/// ratios count / main term. `counts[k]` are the counts with 4, 2, 0 real roots below `xs[k]`.
pub fn counts_svg(xs: &[f64], counts: &[[u64; 3]], bound: i128) -> Result<String, Error> {
    picture(
        &format!(
            "Classes of irreducible integral binary quartic forms with H < X (table bound {bound})"
        ),
        |root| {
            let (upper, lower) = root.split_vertically(470);
            let (x0, x1) = (xs[0], *xs.last().expect("points"));
            let ymax = xs
                .iter()
                .map(|&x| main_term(2, x))
                .chain(counts.iter().flat_map(|c| c.iter().map(|&n| n as f64)))
                .fold(10.0, f64::max)
                * 1.5;
            let mut chart = ChartBuilder::on(&upper)
                .margin(12)
                .margin_right(40)
                .x_label_area_size(40)
                .y_label_area_size(80)
                .build_cartesian_2d((x0..x1).log_scale(), (0.5..ymax).log_scale())
                .map_err(drawing)?;
            mesh!(chart, "X, the height bound", "number of classes with H < X");
            for (k, (real, name)) in SIGNATURES.iter().enumerate() {
                let c = colour(k);
                let pts: Vec<(f64, f64)> = xs
                    .iter()
                    .zip(counts)
                    .filter(|(_, n)| n[k] > 0)
                    .map(|(&x, n)| (x, n[k] as f64))
                    .collect();
                solid(&mut chart, pts, c, format!("{name}: classes in the table"))?;
                let terms: Vec<(f64, f64)> = xs.iter().map(|&x| (x, main_term(*real, x))).collect();
                let weight = [4, 32, 8][k];
                chart
                    .draw_series(DashedLineSeries::new(terms, 8, 5, c.stroke_width(1)))
                    .map_err(drawing)?
                    .label(format!("{name}: main term ({weight}/135) zeta(2) X^(5/6)"))
                    .legend(move |(x, y)| {
                        PathElement::new(vec![(x, y), (x + 10, y)], c.stroke_width(1))
                    });
            }
            legend(&mut chart, SeriesLabelPosition::UpperLeft)?;
            let mut ratios = ChartBuilder::on(&lower)
            .margin(12)
            .margin_right(40)
            .x_label_area_size(40)
            .y_label_area_size(80)
            .caption(
                "Ratio of the count to the main term (tends to 1 slowly; main terms recalled from memory)",
                ("sans-serif", 15),
            )
            .build_cartesian_2d((x0..x1).log_scale(), 0.0..1.1)
            .map_err(drawing)?;
            mesh!(ratios, "X, the height bound", "count / main term");
            for (k, (real, name)) in SIGNATURES.iter().enumerate() {
                let ratio = |(&x, n): (&f64, &[u64; 3])| (x, n[k] as f64 / main_term(*real, x));
                let pts = xs.iter().zip(counts).map(ratio).collect();
                solid(&mut ratios, pts, colour(k), name.to_string())?;
            }
            legend(&mut ratios, SeriesLabelPosition::UpperLeft)?;
            Ok(())
        },
    )
}

/// The average size of the 2-Selmer group over the curves with height below Y, against Y
/// (log axis), the averages of the decades as points, and the published limit 3.
/// `running[k] = (Y, average below Y)`, `decades[k] = (middle of the decade, average)`.
pub fn selmer_svg(
    running: &[(f64, f64)],
    decades: &[(f64, f64)],
    height: i128,
) -> Result<String, Error> {
    picture(&format!("Average size of the 2-Selmer group of y^2 = x^3 + Ax + B with height below Y (Y up to {height})"), |root| {
        let x0 = running.first().map_or(1.0, |p| p.0);
        let x1 = running.last().map_or(10.0, |p| p.0).max(x0 * 10.0);
        let mut chart = ChartBuilder::on(root)
            .margin(14)
            .margin_right(40)
            .x_label_area_size(44)
            .y_label_area_size(70)
            .build_cartesian_2d((x0..x1).log_scale(), 0.0..3.6)
            .map_err(drawing)?;
        mesh!(chart, "Y, the height bound max(4|A|^3, 27B^2) < Y", "average size of the 2-Selmer group");
        let blue = colour(0);
        solid(
            &mut chart,
            running.to_vec(),
            blue,
            "average over the curves with height below Y".into(),
        )?;
        let green = colour(2);
        chart
            .draw_series(decades.iter().map(|&p| Circle::new(p, 5, green.filled())))
            .map_err(drawing)?
            .label("average within one decade of heights")
            .legend(move |(x, y)| Circle::new((x + 12, y), 5, green.filled()));
        let red = colour(1);
        chart
            .draw_series(DashedLineSeries::new(
                vec![(x0, 3.0), (x1, 3.0)],
                10,
                6,
                red.stroke_width(2),
            ))
            .map_err(drawing)?
            .label("published limit 3 of the average (recalled from memory)")
            .legend(move |(x, y)| PathElement::new(vec![(x, y), (x + 24, y)], red.stroke_width(2)));
        legend(&mut chart, SeriesLabelPosition::LowerRight)?;
        Ok(())
    })
}

/// The counts picture of a table: 80 values of X from 1000 (the smallest height of a class
/// is 1000) to the table's bound.
pub fn table_counts_svg(conn: &rusqlite::Connection) -> Result<String, Error> {
    let params = qorbits::table::reader::table_params(conn)?;
    let bound = params.height as f64;
    let xs = log_grid(1000f64.min(bound / 10.0), bound, 80);
    let counts = qorbits::table::stats::counts_below(conn, &xs)?;
    counts_svg(&xs, &counts, params.height)
}

/// The Selmer picture of `selmer-stats`: the running average at 80 values of Y and the
/// decade averages.
pub fn stats_selmer_svg(st: &qorbits::selmer::SelmerStats) -> Result<String, Error> {
    use qorbits::selmer::short_height;
    let heights: Vec<(f64, u64)> = st
        .curves
        .iter()
        .map(|&(a, b, r)| (short_height(a, b) as f64, 1u64 << r))
        .collect();
    let lo = heights.first().map_or(1.0, |h| h.0.max(1.0));
    let ys = log_grid(lo * 1.0001, st.height as f64, 80);
    let (mut n, mut total, mut k) = (0u64, 0u64, 0);
    let mut running = Vec::new();
    for y in ys {
        while k < heights.len() && heights[k].0 < y {
            n += 1;
            total += heights[k].1;
            k += 1;
        }
        if n > 0 {
            running.push((y, total as f64 / n as f64));
        }
    }
    let decades: Vec<(f64, f64)> = st
        .bins
        .iter()
        .filter(|b| b.curves > 0)
        .map(|b| (((b.lo.max(1) as f64) * (b.hi as f64)).sqrt(), b.average()))
        .collect();
    selmer_svg(&running, &decades, st.height)
}
