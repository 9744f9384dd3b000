#include "census/CensusOptions.h"

#include "photometry/base/InputError.h"
#include "photometry/base/OptionChecks.h"

#include <algorithm>
#include <charconv>

namespace starcensus::census {

namespace po = boost::program_options;

namespace {

/// A numeric option whose default is shown as written (%g), not with binary round-off.
po::typed_value<double>* number(double& target, const char* value_name) {
    return po::value(&target)->default_value(target, numberText(target))->value_name(value_name);
}

} // namespace

po::typed_value<double>* numberOption(double& target, const char* value_name) {
    return number(target, value_name);
}

po::options_description censusOptions(CensusSettings& settings) {
    po::options_description options("Census (membership, quality cuts, Monte Carlo)");
    auto add = options.add_options();
    add("radius",
        po::value(&settings.radii_text)->default_value(settings.radii_text)->value_name("PC[,PC...]"),
        "census radius or radii, comma-separated (pc), e.g. 5,10,20");
    add("distance-prior",
        po::value(&settings.prior_name)->default_value(settings.prior_name)->value_name("NAME"),
        "distance prior of the membership posterior: constant-density (p(r) ∝ r^2) or flat-parallax");
    MembershipSettings& membership = settings.membership;
    add("prior-outer-distance", number(membership.outer_distance_pc, "PC"),
        "outer distance where the distance prior is truncated (pc); must exceed every radius");
    add("parallax-zero-point", number(membership.parallax_zero_point_mas, "MAS"),
        "parallax zero point subtracted from catalogue parallaxes (mas); Gaia DR3: about -0.017 (Lindegren "
        "et al. "
        "2021)");
    add("parallax-error-scale", number(membership.parallax_error_inflation, "FACTOR"),
        "factor applied to catalogue parallax errors (>= 1 inflates)");
    QualitySettings& quality = settings.quality;
    add("max-ruwe", number(quality.max_ruwe, "RUWE"), "remove rows with RUWE above this (0 disables)");
    add("inflate-errors-above-ruwe", number(quality.inflate_errors_above_ruwe, "RUWE"),
        "multiply the parallax error by RUWE for rows with RUWE above this (0 disables)");
    add("min-parallax-snr", number(quality.min_parallax_snr_to_classify, "SNR"),
        "classify only rows with parallax/error at least this; others count as members, class unclassified");
    add("max-colour-error", number(quality.max_colour_error_mag, "MAG"),
        "drop BP-RP when the BP or RP error exceeds this (mag); the row is classified from M_G alone");
    add("spectral-types",
        po::value(&settings.spectral_types_name)
            ->default_value(settings.spectral_types_name)
            ->value_name("HOW"),
        "catalogue spectral types (field spectral_type): use (they set the class; a spectrum beats colours), "
        "check (photometric classes, compared with them), ignore");
    add("draws", po::value(&settings.draws.draws)->default_value(settings.draws.draws)->value_name("N"),
        "Monte Carlo draws over the measurement errors");
    add("seed", po::value(&settings.draws.seed)->default_value(settings.draws.seed)->value_name("N"),
        "random seed");
    add("group", po::value(&settings.group_definitions)->composing()->value_name("NAME=ITEMS"),
        "extra class group NAME=ITEM[,ITEM...]; items are classes or subtype ranges, e.g. FGK=F,G,K or "
        "earlyM=M0-M4 (repeatable)");
    CatalogMergeSettings& merge = settings.merge;
    add("match-radius", number(merge.match_radius_arcsec, "ARCSEC"),
        "rows of different files closer than this at J2016.0 (after their proper motions) are one object "
        "(arcsec; 0: merge by source_id only)");
    add("match-parallax-sigma", number(merge.parallax_consistency_sigma, "K"),
        "a positional match also needs parallaxes within K combined standard errors");
    add("catalog-epoch", number(merge.default_epoch_yr, "YEAR"),
        "epoch of the positions of every input without its own --file-epoch (Julian year; Gaia DR3: 2016)");
    add("file-epoch", po::value(&settings.file_epoch_definitions)->composing()->value_name("FILE=YEAR"),
        "epoch of one input file's positions (Julian year), e.g. 2mass.csv=2000 (repeatable)");
    SystemSettings& systems = settings.systems;
    add("no-systems", po::bool_switch()->notifier([&settings](bool off) { settings.find_systems = !off; }),
        "skip the stellar-system census: no companion search, no systems.fits, no system columns or "
        "sections in the other outputs");
    add("system-separation-max", number(systems.max_projected_separation_pc, "PC"),
        "widest projected separation of a resolved pair (pc; wide binaries reach ~1 pc)");
    add("system-search-angle-max", number(systems.max_search_angle_deg, "DEG"),
        "cap of the companion search radius on the sky (deg)");
    add("system-sky-shift", number(systems.sky_shift_deg, "DEG"),
        "displacement of the shifted skies that measure chance alignments (deg; above the search cap)");
    add("system-sky-shifts",
        po::value(&systems.sky_shifts)->default_value(systems.sky_shifts)->value_name("N"),
        "shifted skies averaged for the chance-alignment probabilities");
    add("system-chance-max", number(systems.max_chance_probability, "P"),
        "pairs with a larger chance-alignment probability are not joined into systems");
    add("system-ruwe", number(systems.unresolved_ruwe, "RUWE"),
        "objects with a larger RUWE are flagged as likely unresolved binaries");
    return options;
}

std::vector<double> parsePositiveList(const std::string& text, const std::string& option) {
    std::vector<double> values;
    std::size_t start = 0;
    while (start <= text.size()) {
        const std::size_t comma = std::min(text.find(',', start), text.size());
        const std::string item = text.substr(start, comma - start);
        double value = 0.0;
        const auto [end, error] = std::from_chars(item.data(), item.data() + item.size(), value);
        if (item.empty() || error != std::errc{} || end != item.data() + item.size() || !(value > 0.0)) {
            throw InputError("--" + option + ": '" + item + "' in '" + text + "' is not a positive number");
        }
        values.push_back(value);
        start = comma + 1;
    }
    return values;
}

void validate(CensusSettings& settings) {
    settings.radii_pc = parsePositiveList(settings.radii_text, "radius");
    std::sort(settings.radii_pc.begin(), settings.radii_pc.end());
    settings.radii_pc.erase(std::unique(settings.radii_pc.begin(), settings.radii_pc.end()),
                            settings.radii_pc.end());
    if (settings.prior_name == "constant-density") {
        settings.membership.prior = DistancePrior::ConstantDensity;
    } else if (settings.prior_name == "flat-parallax") {
        settings.membership.prior = DistancePrior::FlatParallax;
    } else {
        throw InputError("--distance-prior: '" + settings.prior_name +
                         "' is not one of constant-density, flat-parallax");
    }
    requireThat(settings.membership.outer_distance_pc > settings.radii_pc.back(), "prior-outer-distance",
                "must exceed the largest radius (" + numberText(settings.radii_pc.back()) + " pc)");
    requireInRange("parallax-zero-point", settings.membership.parallax_zero_point_mas, -1.0, 1.0, "mas");
    requireInRange("parallax-error-scale", settings.membership.parallax_error_inflation, 0.1, 10.0, "");
    requireInRange("max-ruwe", settings.quality.max_ruwe, 0.0, 100.0, "");
    requireInRange("inflate-errors-above-ruwe", settings.quality.inflate_errors_above_ruwe, 0.0, 100.0, "");
    requireInRange("min-parallax-snr", settings.quality.min_parallax_snr_to_classify, 0.0, 1000.0, "");
    requireInRange("max-colour-error", settings.quality.max_colour_error_mag, 0.0, 10.0, "mag",
                   LowerBound::Exclusive);
    requireInRange("draws", settings.draws.draws, 1, 1e7, "");
    const auto policy = spectralTypePolicyFromName(settings.spectral_types_name);
    requireThat(policy.has_value(), "spectral-types",
                "'" + settings.spectral_types_name + "' is not one of use, check, ignore");
    settings.spectral_types = *policy;
    requireInRange("match-radius", settings.merge.match_radius_arcsec, 0.0, 3600.0, "arcsec");
    requireInRange("match-parallax-sigma", settings.merge.parallax_consistency_sigma, 0.0, 100.0, "",
                   LowerBound::Exclusive);
    requireInRange("catalog-epoch", settings.merge.default_epoch_yr, 1900.0, 2100.0, "yr");
    validateSystemSettings(settings.systems);
    settings.file_epochs.clear();
    for (const auto& definition : settings.file_epoch_definitions) {
        const auto equals = definition.rfind('=');
        double year = 0.0;
        bool parsed = equals != std::string::npos && equals > 0;
        if (parsed) {
            const char* end = definition.data() + definition.size();
            const auto [stop, error] = std::from_chars(definition.data() + equals + 1, end, year);
            parsed = error == std::errc{} && stop == end && equals + 1 < definition.size();
        }
        requireThat(parsed, "file-epoch", "'" + definition + "' is not FILE=YEAR");
        requireInRange("file-epoch", year, 1900.0, 2100.0, "yr");
        settings.file_epochs.emplace_back(definition.substr(0, equals), year);
    }
    settings.groups = standardClassGroups();
    for (const auto& definition : settings.group_definitions) {
        ClassGroup group = parseClassGroup(definition);
        // Names key the JSON outputs and name the draws.fits columns, so they must be unique.
        requireThat(std::none_of(settings.groups.begin(), settings.groups.end(),
                                 [&](const ClassGroup& other) { return other.name == group.name; }),
                    "group", "'" + group.name + "' repeats the name of a class or an earlier group");
        settings.groups.push_back(std::move(group));
    }
}

RowClassRules rowClassRules(const CensusSettings& settings) {
    return {.parallax_zero_point_mas = settings.membership.parallax_zero_point_mas,
            .min_parallax_snr_to_classify = settings.quality.min_parallax_snr_to_classify,
            .spectral_types = settings.spectral_types};
}

} // namespace starcensus::census
