//! The works a report can cite, by key.
//!
//! Sections cite a [`Work`]; the document's references list is exactly the works
//! cited, each once, in author–year order ([`sorted`]). A work that no section
//! cites is never listed.

/// A published work the methods rest on.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
#[allow(missing_docs)]
pub enum Work {
    AbramowitzStegun1964,
    BelsleyKuhWelsch1980,
    BollenJackman1990,
    BrownForsythe1974,
    ChanGolubLeVeque1983,
    Cohen1988,
    Cook1977,
    CookWeisberg1982,
    DixonPechmann2005,
    Dunn1961,
    Dunnett1955,
    Fisher1932,
    Genz1992,
    GenzBretz2002,
    HoaglinWelsch1978,
    Holm1979,
    HyndmanFan1996,
    IchQ1e2003,
    JohnsonNeyman1936,
    Kramer1956,
    Llabres2000,
    MacKinnonWhite1985,
    Potthoff1964,
    Royston1995,
    Satterthwaite1946,
    Schuirmann1987,
    SearleSpeedMilliken1980,
    ShapiroWilk1965,
    SnedecorCochran1989,
    Steiger2004,
    TsongChenChen2003,
    Tukey1953,
    Weisberg1985,
    Welch1947,
    Welford1962,
    White1980,
    WorkingHotelling1929,
}

impl Work {
    /// Every work, for tests.
    pub const ALL: [Work; 37] = [
        Work::AbramowitzStegun1964,
        Work::BelsleyKuhWelsch1980,
        Work::BollenJackman1990,
        Work::BrownForsythe1974,
        Work::ChanGolubLeVeque1983,
        Work::Cohen1988,
        Work::Cook1977,
        Work::CookWeisberg1982,
        Work::DixonPechmann2005,
        Work::Dunn1961,
        Work::Dunnett1955,
        Work::Fisher1932,
        Work::Genz1992,
        Work::GenzBretz2002,
        Work::HoaglinWelsch1978,
        Work::Holm1979,
        Work::HyndmanFan1996,
        Work::IchQ1e2003,
        Work::JohnsonNeyman1936,
        Work::Kramer1956,
        Work::Llabres2000,
        Work::MacKinnonWhite1985,
        Work::Potthoff1964,
        Work::Royston1995,
        Work::Satterthwaite1946,
        Work::Schuirmann1987,
        Work::SearleSpeedMilliken1980,
        Work::ShapiroWilk1965,
        Work::SnedecorCochran1989,
        Work::Steiger2004,
        Work::TsongChenChen2003,
        Work::Tukey1953,
        Work::Weisberg1985,
        Work::Welch1947,
        Work::Welford1962,
        Work::White1980,
        Work::WorkingHotelling1929,
    ];

    /// How the text cites it: authors and year.
    pub fn short(self) -> &'static str {
        self.parts().0
    }

    /// The references-list entry.
    pub fn entry(self) -> &'static str {
        self.parts().1
    }

    fn parts(self) -> (&'static str, &'static str) {
        match self {
            Work::AbramowitzStegun1964 => (
                "Abramowitz & Stegun 1964",
                "Abramowitz, M. & Stegun, I. A. (1964) Handbook of Mathematical Functions.",
            ),
            Work::BelsleyKuhWelsch1980 => (
                "Belsley, Kuh & Welsch 1980",
                "Belsley, D. A., Kuh, E. & Welsch, R. E. (1980) Regression Diagnostics.",
            ),
            Work::BollenJackman1990 => (
                "Bollen & Jackman 1990",
                "Bollen, K. A. & Jackman, R. W. (1990) in Modern Methods of Data Analysis, 257–291.",
            ),
            Work::BrownForsythe1974 => (
                "Brown & Forsythe 1974",
                "Brown, M. B. & Forsythe, A. B. (1974) JASA 69, 364–367.",
            ),
            Work::ChanGolubLeVeque1983 => (
                "Chan, Golub & LeVeque 1983",
                "Chan, T. F., Golub, G. H. & LeVeque, R. J. (1983) The American Statistician 37, 242–247.",
            ),
            Work::Cohen1988 => (
                "Cohen 1988",
                "Cohen, J. (1988) Statistical Power Analysis for the Behavioral Sciences, 2nd ed.",
            ),
            Work::Cook1977 => ("Cook 1977", "Cook, R. D. (1977) Technometrics 19, 15–18."),
            Work::CookWeisberg1982 => (
                "Cook & Weisberg 1982",
                "Cook, R. D. & Weisberg, S. (1982) Residuals and Influence in Regression.",
            ),
            Work::DixonPechmann2005 => (
                "Dixon & Pechmann 2005",
                "Dixon, P. M. & Pechmann, J. H. K. (2005) Ecology 86, 1751–1756.",
            ),
            Work::Dunn1961 => ("Dunn 1961", "Dunn, O. J. (1961) JASA 56, 52–64."),
            Work::Dunnett1955 => ("Dunnett 1955", "Dunnett, C. W. (1955) JASA 50, 1096–1121."),
            Work::Genz1992 => (
                "Genz 1992",
                "Genz, A. (1992) Journal of Computational and Graphical Statistics 1, 141–149.",
            ),
            Work::GenzBretz2002 => (
                "Genz & Bretz 2002",
                "Genz, A. & Bretz, F. (2002) Journal of Computational and Graphical Statistics 11, 950–971.",
            ),
            Work::Fisher1932 => (
                "Fisher 1932",
                "Fisher, R. A. (1932) Statistical Methods for Research Workers, 4th ed.",
            ),
            Work::HoaglinWelsch1978 => (
                "Hoaglin & Welsch 1978",
                "Hoaglin, D. C. & Welsch, R. E. (1978) The American Statistician 32, 17–22.",
            ),
            Work::Holm1979 => (
                "Holm 1979",
                "Holm, S. (1979) Scandinavian Journal of Statistics 6, 65–70.",
            ),
            Work::HyndmanFan1996 => (
                "Hyndman & Fan 1996",
                "Hyndman, R. J. & Fan, Y. (1996) The American Statistician 50, 361–365.",
            ),
            Work::IchQ1e2003 => (
                "ICH Q1E 2003",
                "ICH (2003) Q1E Evaluation for Stability Data.",
            ),
            Work::JohnsonNeyman1936 => (
                "Johnson & Neyman 1936",
                "Johnson, P. O. & Neyman, J. (1936) Statistical Research Memoirs 1, 57–93.",
            ),
            Work::Kramer1956 => (
                "Kramer 1956",
                "Kramer, C. Y. (1956) Biometrics 12, 307–310.",
            ),
            Work::MacKinnonWhite1985 => (
                "MacKinnon & White 1985",
                "MacKinnon, J. G. & White, H. (1985) Journal of Econometrics 29, 305–325.",
            ),
            Work::Potthoff1964 => (
                "Potthoff 1964",
                "Potthoff, R. F. (1964) Psychometrika 29, 241–256.",
            ),
            Work::Royston1995 => (
                "Royston 1995",
                "Royston, P. (1995) Applied Statistics 44, 547–551.",
            ),
            Work::Satterthwaite1946 => (
                "Satterthwaite 1946",
                "Satterthwaite, F. E. (1946) Biometrics Bulletin 2, 110–114.",
            ),
            Work::Llabres2000 => (
                "Llabres et al. 2000",
                "Llabres, C. M. et al. (2000), an equivalence approach to pooling stability batches (cited from memory).",
            ),
            Work::TsongChenChen2003 => (
                "Tsong, Chen & Chen 2003",
                "Tsong, Y., Chen, W.-J. & Chen, C.-W. (2003), equivalence tests for pooling stability batches, Journal of Biopharmaceutical Statistics (cited from memory).",
            ),
            Work::Schuirmann1987 => (
                "Schuirmann 1987",
                "Schuirmann, D. J. (1987) Journal of Pharmacokinetics and Biopharmaceutics 15, 657–680.",
            ),
            Work::SearleSpeedMilliken1980 => (
                "Searle, Speed & Milliken 1980",
                "Searle, S. R., Speed, F. M. & Milliken, G. A. (1980) The American Statistician 34, 216–221.",
            ),
            Work::ShapiroWilk1965 => (
                "Shapiro & Wilk 1965",
                "Shapiro, S. S. & Wilk, M. B. (1965) Biometrika 52, 591–611.",
            ),
            Work::SnedecorCochran1989 => (
                "Snedecor & Cochran 1989",
                "Snedecor, G. W. & Cochran, W. G. (1989) Statistical Methods, 8th ed.",
            ),
            Work::Steiger2004 => (
                "Steiger 2004",
                "Steiger, J. H. (2004) Psychological Methods 9, 164–182.",
            ),
            Work::Tukey1953 => (
                "Tukey 1953",
                "Tukey, J. W. (1953) The Problem of Multiple Comparisons (unpublished).",
            ),
            Work::Weisberg1985 => (
                "Weisberg 1985",
                "Weisberg, S. (1985) Applied Linear Regression, 2nd ed.",
            ),
            Work::Welch1947 => ("Welch 1947", "Welch, B. L. (1947) Biometrika 34, 28–35."),
            Work::Welford1962 => (
                "Welford 1962",
                "Welford, B. P. (1962) Technometrics 4, 419–420.",
            ),
            Work::WorkingHotelling1929 => (
                "Working & Hotelling 1929",
                "Working, H. & Hotelling, H. (1929) JASA 24 (165A), 73–85.",
            ),
            Work::White1980 => ("White 1980", "White, H. (1980) Econometrica 48, 817–838."),
        }
    }
}

/// The works, each once, in author–year order: by the entry's text, which starts
/// with the first author's surname and holds the year in brackets after the authors.
pub fn sorted(mut works: Vec<Work>) -> Vec<Work> {
    works.sort_by(|a, b| a.entry().cmp(b.entry()).then(a.cmp(b)));
    works.dedup();
    works
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sorted_is_author_year_order_without_repeats() {
        let got = sorted(vec![
            Work::Welch1947,
            Work::Cook1977,
            Work::Welch1947,
            Work::AbramowitzStegun1964,
        ]);
        assert_eq!(
            got,
            vec![Work::AbramowitzStegun1964, Work::Cook1977, Work::Welch1947]
        );
        // Every entry begins with the short form's first name, so the list reads in
        // the order the text cites by.
        for w in Work::ALL {
            let first = w.short().split([',', ' ']).next().unwrap();
            assert!(w.entry().starts_with(first), "{w:?}");
        }
        let all = sorted(Work::ALL.to_vec());
        assert_eq!(all.len(), Work::ALL.len());
    }
}
