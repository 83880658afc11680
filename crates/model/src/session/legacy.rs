//! Older session formats and how they become the current one.
//!
//! Format 1 (the first, written by comptrail before 2026-12-02's format 2) kept the market
//! file's absolute path only, as `market.path`. Format 2 keeps a `market.location` with the
//! absolute path and the path from the session's own folder, so a case folder can be moved.
//! Format 3 (2026-12-03) keeps every worksheet amount in whole cents; formats 1 and 2 are read
//! with their amounts rounded to the cent (see `money::RoundAmountsOnRead`).

use serde::Deserialize;

use super::{Authorship, FitRecord, MarketLocation, MarketRecord, Outcome, Purpose, Session};
use crate::adjustment::AdjustmentKind;
use crate::appraisal::{Appraisal, AppraisalRequest};
use crate::market::{Listing, MarketSource};

/// `market` in format 1.
#[derive(Debug, Deserialize)]
struct MarketRecordV1 {
    source: MarketSource,
    path: Option<String>,
    segment: String,
    segment_rows: usize,
}

/// A whole format-1 session.
#[derive(Debug, Deserialize)]
pub(super) struct SessionV1 {
    authorship: Authorship,
    market: MarketRecordV1,
    fit: FitRecord,
    request: AppraisalRequest,
    appraisal: Appraisal,
    purpose: Purpose,
    result: Outcome,
    #[serde(default)]
    segment_listings: Option<Vec<Listing>>,
}

impl SessionV1 {
    /// The same session in the current format.
    pub(super) fn migrate(self) -> Session {
        let mut appraisal = self.appraisal;
        name_sale_class_lines(&mut appraisal);
        Session {
            format_version: super::SESSION_FORMAT_VERSION,
            authorship: self.authorship,
            case: crate::case::CaseDetails::default(),
            market: MarketRecord {
                source: self.market.source,
                location: MarketLocation {
                    absolute: self.market.path,
                    from_session: None,
                },
                segment: self.market.segment,
                segment_rows: self.market.segment_rows,
            },
            fit: self.fit,
            request: self.request,
            appraisal,
            purpose: self.purpose,
            result: self.result,
            segment_supply: None,
            segment_listings: self.segment_listings,
        }
    }
}

/// A whole format-2 or format-3 session: the current shape before format 4 added the case
/// details (format 3 refuses fractions of a cent and may carry the age form's choice, both read
/// by the same shape).
#[derive(Debug, Deserialize)]
pub(super) struct SessionV2To3 {
    authorship: Authorship,
    market: MarketRecord,
    fit: FitRecord,
    request: AppraisalRequest,
    appraisal: Appraisal,
    purpose: Purpose,
    result: Outcome,
    #[serde(default)]
    segment_supply: Option<crate::supply::SegmentSupply>,
    #[serde(default)]
    segment_listings: Option<Vec<Listing>>,
}

impl SessionV2To3 {
    /// The same session in the current format.
    pub(super) fn migrate(self) -> Session {
        let mut appraisal = self.appraisal;
        name_sale_class_lines(&mut appraisal);
        Session {
            format_version: super::SESSION_FORMAT_VERSION,
            authorship: self.authorship,
            case: crate::case::CaseDetails::default(),
            market: self.market,
            fit: self.fit,
            request: self.request,
            appraisal,
            purpose: self.purpose,
            result: self.result,
            segment_supply: self.segment_supply,
            segment_listings: self.segment_listings,
        }
    }
}

/// Before format 4 the fitted sale-class line of every comparable was of kind `condition`, the
/// kind the appraiser's own condition lines also use. The fitted line is always the first of
/// that kind (the grid's four model lines come before the appraiser's), so it is renamed.
fn name_sale_class_lines(appraisal: &mut Appraisal) {
    for c in &mut appraisal.comparables {
        if let Some(line) = c
            .adjustments
            .iter_mut()
            .find(|l| l.kind == AdjustmentKind::Condition)
        {
            line.kind = AdjustmentKind::SaleClass;
        }
    }
}
