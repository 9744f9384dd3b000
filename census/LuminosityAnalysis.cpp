#include "census/LuminosityAnalysis.h"

#include "census/RowClassification.h"
#include "photometry/ModelPhotometry.h"

#include <cmath>
#include <limits>

namespace starcensus::census {

namespace {

constexpr double kInfinity = std::numeric_limits<double>::infinity();

struct ClassifiedRow {
    double abs_g_mag;
    double distance_pc;
    photometry::Category category;
    bool beyond_faint_limit; // no G, or fainter than the faint limit: found by another catalogue
};

std::vector<ClassifiedRow> classifyRows(std::span<const photometry::CatalogRow> rows,
                                        const photometry::Classifier& classifier,
                                        const CensusSettings& census, double faint_limit_g_mag) {
    std::vector<ClassifiedRow> classified;
    classified.reserve(rows.size());
    const double zero_point = census.membership.parallax_zero_point_mas;
    const RowClassRules rules = rowClassRules(census);
    for (const auto& row : rows) {
        const double parallax_mas = row.parallax_mas - zero_point;
        const photometry::Classification result = classifyRow(row, classifier, rules);
        classified.push_back({result.abs_g_mag, parallax_mas > 0.0 ? 1000.0 / parallax_mas : kInfinity,
                              photometry::censusCategory(result), !(row.g_mag <= faint_limit_g_mag)});
    }
    return classified;
}

std::vector<SampleStar> starsWithin(const std::vector<ClassifiedRow>& classified,
                                    const PreparedSample& sample, std::size_t r) {
    std::vector<SampleStar> stars;
    stars.reserve(classified.size());
    for (std::size_t s = 0; s < classified.size(); ++s) {
        const ClassifiedRow& row = classified[s];
        const float weight = sample.probabilityWithin(s, r);
        if (std::isfinite(row.abs_g_mag) && std::isfinite(row.distance_pc) && weight > 0.0) {
            stars.push_back({row.abs_g_mag, row.distance_pc, weight, row.category});
        }
    }
    return stars;
}

// Per radius, the members beyond the faint limit by category (CompletenessCorrection.h).
MembersBeyondLimits membersBeyondLimits(const std::vector<ClassifiedRow>& classified,
                                        const PreparedSample& sample) {
    MembersBeyondLimits beyond(sample.radii().size());
    for (std::size_t s = 0; s < classified.size(); ++s) {
        if (classified[s].beyond_faint_limit) {
            for (std::size_t r = 0; r < beyond.size(); ++r) {
                beyond[r][classified[s].category] += sample.probabilityWithin(s, r);
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
    std::vector<ClassifiedRow> classified =
        classifyRows(rows, classifier, census, analysis.limits.faint_g_mag);
    const std::vector<double>& radii = census.radii_pc;
    std::vector<SampleStar> stars;
    for (std::size_t r = 0; r < radii.size(); ++r) {
        stars = starsWithin(classified, sample, r);
        analysis.completeness.push_back(
            assessCompleteness(stars, radii[r], census.groups, analysis.limits, ranges, completeness));
    }
    // What the correction reads of the classified rows; the rows themselves (24 bytes a candidate) are
    // let go before the luminosity function makes its own copy of the members.
    const MembersBeyondLimits beyond = membersBeyondLimits(classified, sample);
    std::vector<ClassifiedRow>().swap(classified);
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
