#include "census/LuminosityAnalysis.h"

#include "census/RowClassification.h"
#include "photometry/ModelPhotometry.h"

#include <cmath>
#include <limits>

namespace starcensus::census {

namespace {

constexpr double kInfinity = std::numeric_limits<double>::infinity();

/// Every row as the luminosity analysis reads it: its absolute magnitude, distance and category (the
/// weight is set per radius), and whether it lies beyond the faint limit (no G, or fainter: found by
/// another catalogue).
struct ClassifiedRows {
    std::vector<SampleStar> stars;
    std::vector<bool> beyond_faint_limit;
};

ClassifiedRows classifyRows(std::span<const photometry::CatalogRow> rows,
                            const photometry::Classifier& classifier, const CensusSettings& census,
                            double faint_limit_g_mag) {
    ClassifiedRows classified;
    classified.stars.reserve(rows.size());
    classified.beyond_faint_limit.reserve(rows.size());
    const double zero_point = census.membership.parallax_zero_point_mas;
    const RowClassRules rules = rowClassRules(census);
    for (const auto& row : rows) {
        const double parallax_mas = row.parallax_mas - zero_point;
        const photometry::Classification result = classifyRow(row, classifier, rules);
        classified.stars.push_back({result.abs_g_mag, parallax_mas > 0.0 ? 1000.0 / parallax_mas : kInfinity,
                                    1.0f, photometry::censusCategory(result)});
        classified.beyond_faint_limit.push_back(!(row.g_mag <= faint_limit_g_mag));
    }
    return classified;
}

/// The classified rows' stars that count within radii()[r], with their weights there: from a copy of
/// the classified stars for the smaller radii, from the stars themselves (moved in) for the last, so the
/// luminosity function's stars are not a second array of every row (24 bytes a candidate).
std::vector<SampleStar> starsWithin(std::vector<SampleStar> stars, const PreparedSample& sample,
                                    std::size_t r) {
    std::size_t kept = 0;
    for (std::size_t s = 0; s < stars.size(); ++s) {
        SampleStar& star = stars[s];
        star.weight = sample.probabilityWithin(s, r);
        if (std::isfinite(star.abs_g_mag) && std::isfinite(star.distance_pc) && star.weight > 0.0) {
            stars[kept++] = star;
        }
    }
    stars.resize(kept);
    return stars;
}

// Per radius, the members beyond the faint limit by category (CompletenessCorrection.h).
MembersBeyondLimits membersBeyondLimits(const ClassifiedRows& classified, const PreparedSample& sample) {
    MembersBeyondLimits beyond(sample.radii().size());
    for (std::size_t s = 0; s < classified.stars.size(); ++s) {
        if (classified.beyond_faint_limit[s]) {
            for (std::size_t r = 0; r < beyond.size(); ++r) {
                beyond[r][classified.stars[s].category] += sample.probabilityWithin(s, r);
            }
        }
    }
    return beyond;
}

} // namespace

LuminosityAnalysis analyseLuminosity(std::span<const photometry::CatalogRow> rows,
                                     const PreparedSample& sample, const DrawTallies& tallies,
                                     const photometry::Classifier& classifier, const CensusSettings& census,
                                     const LuminosityRunSettings& settings) {
    LuminosityAnalysis analysis;
    const CompletenessSettings& completeness = settings.completeness;
    analysis.limits = {completeness.faint_limit_g_mag, completeness.bright_limit_g_mag};
    analysis.faint_limit_source = "default";
    if (completeness.estimate_faint_limit) {
        std::vector<double> g_mag;
        for (const auto& row : rows) {
            g_mag.push_back(row.g_mag);
        }
        const double estimated = estimateFaintLimitMag(g_mag, completeness);
        if (std::isfinite(estimated)) {
            analysis.limits.faint_g_mag = estimated;
            analysis.faint_limit_source = "estimated";
        }
    }
    const photometry::ModelPhotometry& models = photometry::shippedModelPhotometry();
    const auto ranges = categoryAbsGRanges(models, completeness);
    ClassifiedRows classified = classifyRows(rows, classifier, census, analysis.limits.faint_g_mag);
    const std::vector<double>& radii = census.radii_pc;
    const MembersBeyondLimits beyond = membersBeyondLimits(classified, sample); // for the correction
    const std::size_t last = radii.size() - 1;
    for (std::size_t r = 0; r < last; ++r) {
        analysis.completeness.push_back(assessCompleteness(starsWithin(classified.stars, sample, r), radii[r],
                                                           census.groups, analysis.limits, ranges,
                                                           completeness));
    }
    const std::vector<SampleStar> stars = starsWithin(std::move(classified.stars), sample, last);
    analysis.completeness.push_back(
        assessCompleteness(stars, radii[last], census.groups, analysis.limits, ranges, completeness));
    // The luminosity function and its fits at the largest radius (`stars` holds its weights).
    analysis.lf_radius_pc = radii.back();
    analysis.complete_abs_g_mag =
        completeAbsGRange(radii.back(), analysis.limits, completeness.bright_hole_volume_tolerance);
    analysis.table = estimateLuminosityFunction(
        stars, radii.back(), analysis.limits, completeness.bright_hole_volume_tolerance, settings.luminosity);
    analysis.model_phi.assign(analysis.table.size(), std::numeric_limits<double>::quiet_NaN());
    if (settings.fit_models.empty()) {
        return analysis; // --lf-fit none: the luminosity function without a model or a correction
    }
    const LuminosityModel model(settings.fit.start.mass_min_msun, settings.fit.start.mass_max_msun,
                                settings.model, models);
    for (const ImfFamily family : settings.fit_models) {
        MassFunctionFitSettings fit_settings = settings.fit;
        fit_settings.family = family;
        analysis.fits.push_back(
            fitMassFunction(analysis.table, model, radii.back(), analysis.limits, fit_settings));
        const auto& fit = analysis.fits.back();
        if (fit.converged && (!analysis.correction_fit ||
                              fit.log_likelihood > analysis.fits[*analysis.correction_fit].log_likelihood)) {
            analysis.correction_fit = analysis.fits.size() - 1;
        }
    }
    if (analysis.correction_fit) {
        const auto& fit = analysis.fits[*analysis.correction_fit];
        std::vector<std::array<double, 2>> bins;
        for (const auto& bin : analysis.table) {
            bins.push_back({bin.abs_g_lo_mag, bin.abs_g_hi_mag});
        }
        const std::vector<double> phi = modelPhi(fit, model, bins);
        for (std::size_t b = 0; b < bins.size(); ++b) {
            if (analysis.table[b].population == LfPopulation::MainSequence) {
                analysis.model_phi[b] = phi[b];
            }
        }
        // Only the faint limit is filled in: stars brighter than the bright limit are usually in the
        // input anyway (see README, Methods), and the census counts every member, also those beyond the
        // faint limit that another input file found (taken off the unseen numbers).
        analysis.corrected = correctForCompleteness(tallies, radii, census.groups, model, fit,
                                                    {analysis.limits.faint_g_mag, -kInfinity},
                                                    census.draws.seed, census.draws.threads, beyond);
    }
    return analysis;
}

} // namespace starcensus::census
