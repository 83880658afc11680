//! The terms the screens and the report use, each in a sentence, for the workbench's Help and
//! anyone reading a report without the code.

/// Each term with what it means here.
pub const GLOSSARY: [(&str, &str); 19] = [
    (
        "Indicated value",
        "The value the comparables indicate: the weighted mean of their adjusted prices.",
    ),
    (
        "Value band",
        "The range the value is expected to fall in at the chosen level (80 % means four in five such vehicles would list inside it): the wider of the model's prediction interval and the comparables' spread.",
    ),
    (
        "Appraisal date",
        "The date the value is for; ages and listing ages are counted back from it. In a claim it is the date of loss.",
    ),
    (
        "Comparable (comp)",
        "A listing of the same make and model that passes the filters (model years, mileage, listing age, distance) and is used as evidence.",
    ),
    (
        "Adjustment",
        "A change to a comparable's price for one way it differs from the subject (miles, model year, variant, sale class, market conditions, equipment, or a line of yours with its basis). A comparable better than the subject is adjusted down.",
    ),
    (
        "Net adjustment",
        "The sum of a comparable's adjustments as a share of its price: how far its price moved.",
    ),
    (
        "Gross adjustment",
        "The sum of the adjustments' sizes, ignoring sign, as a share of the price: how unlike the subject the comparable is. Above about 25 % it is a weak comparable.",
    ),
    (
        "Similarity",
        "How alike a comparable and the subject are, from 0 to 1 (one minus the Gower distance over year, miles, variant and sale class).",
    ),
    (
        "Weight",
        "A comparable's share of the indicated value: its similarity, reduced by its gross adjustment; the weights add to 100 %.",
    ),
    (
        "Model's own estimate",
        "The fitted regression's value for the subject, with its prediction interval; a check on the comparables.",
    ),
    (
        "Sold as",
        "The sale class of a listing: new, used or certified pre-owned. Not its physical condition, which is a line of yours.",
    ),
    (
        "ACV",
        "Actual cash value: what the vehicle was worth just before the loss (a claim), or what the dealer offers for it (a trade-in).",
    ),
    (
        "Recon, pack, front gross",
        "A dealer's reconditioning costs, a fixed internal charge per vehicle, and the target margin on its resale: taken off the expected sale price in a trade-in offer.",
    ),
    (
        "Total loss",
        "A vehicle not worth repairing under the claim's rule: repairs at or above a share of ACV, or repairs plus salvage at or above ACV.",
    ),
    (
        "Days' supply",
        "Listings of the model on the market divided by its average daily sales: how long the market would take to sell what is listed.",
    ),
    (
        "Market conditions",
        "The market's change between a comparable's listing date and the appraisal date, from the fitted drift of prices over the months the listings span: a comparable listed in a higher market is adjusted down.",
    ),
    (
        "Equipment line",
        "An adjustment for an option the subject and a comparable differ in, at the option's price fitted from the market (options stated on at least 20 listings).",
    ),
    (
        "Premium fade",
        "Whether a variant's premium over the base shrinks (or grows) with age; kept in the fit only when the F test and the data support it.",
    ),
    (
        "VIN check",
        "Position 9 of a 17-character VIN is a check digit and position 10 codes the model year (49 CFR 565.15); a VIN that fails was probably misread.",
    ),
];
