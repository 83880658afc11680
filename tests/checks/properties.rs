//! Invariants checked over generated inputs (proptest).

use linfa::ParamGuard;
use model::adjustment::{SubjectTerms, model_lines};
use model::appraisal::MarketFit;
use model::condition::Condition;
use model::hedonic::{Attributes, HedonicParams};
use model::market::Market;
use proptest::prelude::*;

fn shared() -> &'static (Market, MarketFit) {
    acceptance::shared_tessel_fit(6_000, 21, model::hedonic::AgeForm::Auto)
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(64))]

    #[test]
    fn a_comparable_identical_to_the_subject_needs_no_adjustment(pick in 0usize..10_000) {
        let (market, fit) = shared();
        let row = fit.included_rows[pick % fit.included_rows.len()];
        let subject = SubjectTerms {
            model_year: market.model_year[row],
            miles: market.miles[row],
            variant: market.variant[row],
            condition: market.condition[row],
        };
        // Constructed by definition: the same attributes need no line; only the market's
        // drift since the listing date can move it, by exactly its fitted rate.
        let months = market.listed_on[row]
            .map_or(0.0, |d| model::hedonic::market_time::months_before(fit.as_of, d));
        let drift = fit.model.market_drift().map_or(0.0, |d| d.per_month_before);
        let options = market.names.name(market.options[row]);
        for line in model_lines(&fit.model, market, row, &subject, options) {
            let expected = if line.kind == model::adjustment::AdjustmentKind::MarketConditions {
                market.asking_price[row] * ((-drift * months).exp() - 1.0)
            } else {
                0.0
            };
            prop_assert!((line.amount - expected).abs() < 1e-9, "{:?}", line);
        }
    }

    #[test]
    fn more_miles_never_raise_a_value_when_the_slope_is_negative(
        age in 0.0f64..12.0,
        miles in 0.0f64..250_000.0,
        extra in 0.0f64..100_000.0,
        variant_pick in 0usize..3,
    ) {
        let (_, fit) = shared();
        prop_assume!(fit.model.miles_slope() < 0.0);
        let variant = fit.model.design().variants[variant_pick % fit.model.design().variants.len()];
        let at = |m: f64| fit.model.estimate(&Attributes { age_years: age, miles: m, variant, condition: Condition::Used }, 0.8).median;
        prop_assert!(at(miles + extra) <= at(miles));
    }

    #[test]
    fn row_order_does_not_change_a_fit(seed in 0u64..1_000) {
        let (market, fit) = shared();
        let mut rows = fit.included_rows.clone();
        // A deterministic permutation from the seed.
        let n = rows.len();
        for i in (1..n).rev() {
            let j = ((seed.wrapping_mul(6_364_136_223_846_793_005).wrapping_add((i as u64).wrapping_mul(1_442_695_040_888_963_407))) % (i as u64 + 1)) as usize;
            rows.swap(i, j);
        }
        let used = fit.model.params();
        let params = HedonicParams::new(fit.as_of)
            .age_form(used.age_form)
            .market_time(used.market_time)
            .variant_slopes(used.variant_slopes)
            .check()
            .unwrap();
        let refit = params.fit(market, &rows).unwrap();
        for (a, b) in refit.coefficients().iter().zip(fit.model.coefficients()) {
            prop_assert!((a - b).abs() <= 1e-9 * (1.0 + b.abs()), "{} vs {}", a, b);
        }
        prop_assert!((refit.residual_sd() - fit.model.residual_sd()).abs() < 1e-12);
    }

    /// The numbers obey their formulas, not merely their order: the prediction interval's
    /// half-width in ln price is t·√(s² + se_fit²) and the confidence interval's t·se_fit
    /// (Kutner et al., ch. 2 and 6), so (PI/t)² − (CI/t)² = s²; the indicated value is Σ w·adjusted
    /// price; the band's half-width in ln price is t·σ of the source named; a higher level gives
    /// a wider band.
    #[test]
    fn intervals_values_and_bands_follow_their_formulas(pick in 0usize..10_000, level in 0.5f64..0.95) {
        let (market, fit) = shared();
        let row = fit.included_rows[pick % fit.included_rows.len()];
        let subject = model::subject::Subject::from_listing(&market.listing(row));
        let appraise_at = |level: f64| {
            let mut request = model::appraisal::AppraisalRequest::new(subject.clone());
            request.level = level;
            model::appraisal::appraise(market, fit, &request).unwrap()
        };
        let a = appraise_at(level);
        let m = &a.model_estimate;
        let df = fit.model.df_residual() as f64;
        let t = model::stats::t_two_sided(level, df);
        let pi_half = (m.prediction_interval.upper / m.median).ln() / t;
        let ci_half = (m.confidence_interval.upper / m.median).ln() / t;
        let s = fit.model.residual_sd();
        prop_assert!((pi_half * pi_half - ci_half * ci_half - s * s).abs() < 1e-9 * s * s, "{} {} {}", pi_half, ci_half, s);
        prop_assert!(((m.median / m.prediction_interval.lower).ln() / t - pi_half).abs() < 1e-9);
        let r = &a.reconciliation;
        if !a.comparables.is_empty() {
            let weighted: f64 = a.comparables.iter().map(|c| c.weight * c.adjusted_price).sum();
            prop_assert!((weighted - r.indicated_value).abs() < 1e-6 * r.indicated_value);
            let total: f64 = r.weights.iter().sum();
            prop_assert!((total - 1.0).abs() < 1e-9);
        }
        let half = (r.value_band.upper / r.indicated_value).ln();
        let expected = match r.band_source {
            model::reconcile::BandSource::Comparables => {
                model::stats::t_two_sided(level, r.effective_count - 1.0) * r.comparables_sigma.unwrap()
            }
            _ => t * r.model_sigma,
        };
        prop_assert!((half - expected).abs() < 1e-9, "{} vs {} ({:?})", half, expected, r.band_source);
        let wider = appraise_at((level + 0.04).min(0.99));
        let wider_half = (wider.reconciliation.value_band.upper / wider.reconciliation.indicated_value).ln();
        prop_assert!(wider_half > half, "{} at a higher level vs {}", wider_half, half);
    }
}
