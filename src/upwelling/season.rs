//! Season metrics of the cumulative upwelling index (Bograd et al. 2009, Geophys. Res.
//! Lett. 36 L01602; details from memory, see REFERENCES.md).

/// The metrics of one upwelling season from daily mean index values.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SeasonMetrics {
    /// Spring transition: the day (1-based, from the season start) of the minimum CUI.
    pub start_day: usize,
    /// End of the season: the day of the maximum CUI after the start.
    pub end_day: usize,
    /// `end_day − start_day`, days.
    pub length_days: usize,
    /// `CUI(end) − CUI(start)`, m^3/s per 100 m × days.
    pub total_m3s_per_100m_days: f64,
    /// CUI at the spring transition.
    pub cui_at_start: f64,
}

/// Bograd et al. 2009: with CUI the running sum of daily index from the season start
/// (1 January; this tool starts southern-hemisphere seasons on 1 July, a design choice),
/// the spring transition is the day of minimum CUI, the end of the season the day of
/// maximum CUI after it. `None` for an empty series.
#[must_use]
pub fn season_metrics(daily_index: &[f64]) -> Option<SeasonMetrics> {
    let cui = super::cumulative(daily_index);
    // The first minimum: ties (a flat CUI) keep the earliest day.
    let (start, cui_start) =
        cui.iter()
            .copied()
            .enumerate()
            .fold(None, |m: Option<(usize, f64)>, (k, c)| match m {
                Some((_, best)) if best <= c => m,
                _ => Some((k, c)),
            })?;
    let (end, cui_end) = cui[start..]
        .iter()
        .copied()
        .enumerate()
        .fold((0, f64::MIN), |m, (k, c)| if c > m.1 { (k, c) } else { m });
    let end = start + end;
    Some(SeasonMetrics {
        start_day: start + 1,
        end_day: end + 1,
        length_days: end - start,
        total_m3s_per_100m_days: cui_end - cui_start,
        cui_at_start: cui_start,
    })
}

#[cfg(test)]
mod tests {
    use super::*;
    use approx::assert_abs_diff_eq;

    /// REFERENCES.md check (Bograd et al. 2009 method): −50 on days 1–90, +150 on days
    /// 91–270, −50 on days 271–365 → start 90, CUI(90) = −4500, end 270, length 180,
    /// total 27 000.
    #[test]
    fn bograd_check() {
        let mut d = vec![-50.0; 90];
        d.extend(vec![150.0; 180]);
        d.extend(vec![-50.0; 95]);
        let m = season_metrics(&d).expect("metrics");
        assert_eq!(m.start_day, 90);
        assert_abs_diff_eq!(m.cui_at_start, -4500.0);
        assert_eq!(m.end_day, 270);
        assert_eq!(m.length_days, 180);
        assert_abs_diff_eq!(m.total_m3s_per_100m_days, 27_000.0);
        assert_eq!(season_metrics(&[]), None);
    }
}
