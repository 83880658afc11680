//! Older session formats and how they become the current one.
//!
//! Format 1 (the first, written by comptrail before 2026-12-02's format 2) kept the market
//! file's absolute path only, as `market.path`. Format 2 keeps a `market.location` with the
//! absolute path and the path from the session's own folder, so a case folder can be moved.
//! Format 3 (2026-12-03) keeps every worksheet amount in whole cents; formats 1 and 2 are read
//! with their amounts rounded to the cent (see `money::RoundAmountsOnRead`).

use serde::Deserialize;

use super::{Authorship, FitRecord, MarketLocation, MarketRecord, Outcome, Purpose, Session};
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
        Session {
            format_version: super::SESSION_FORMAT_VERSION,
            authorship: self.authorship,
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
            appraisal: self.appraisal,
            purpose: self.purpose,
            result: self.result,
            segment_supply: None,
            segment_listings: self.segment_listings,
        }
    }
}

/// A whole format-2 session: the current shape before format 3's additions.
#[derive(Debug, Deserialize)]
pub(super) struct SessionV2 {
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

impl SessionV2 {
    /// The same session in the current format.
    pub(super) fn migrate(self) -> Session {
        Session {
            format_version: super::SESSION_FORMAT_VERSION,
            authorship: self.authorship,
            market: self.market,
            fit: self.fit,
            request: self.request,
            appraisal: self.appraisal,
            purpose: self.purpose,
            result: self.result,
            segment_supply: self.segment_supply,
            segment_listings: self.segment_listings,
        }
    }
}
