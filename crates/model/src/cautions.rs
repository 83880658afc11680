//! The cautions every appraisal output carries: the work affects people's money.

/// Cautions shown with every value, in the order they are printed.
pub const CAUTIONS: [&str; 5] = [
    "This is an estimate from market listings, not a certified appraisal, legal advice or a claim determination.",
    "The insurance policy and the rules of the jurisdiction govern any settlement; some jurisdictions require a licensed appraiser.",
    "Asking prices are not sale prices: listings usually sell below their asking price.",
    "Keep the evidence for every comparable and every adjustment with the file.",
    "A listing priced far below the market may hide a branded title or damage; inspect before relying on it.",
];
