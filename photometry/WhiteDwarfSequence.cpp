#include "photometry/WhiteDwarfSequence.h"

#include "photometry/DwarfLocus.h"
#include "photometry/base/DataFiles.h"
#include "photometry/base/InputError.h"
#include "photometry/base/TextTable.h"

#include <cmath>
#include <functional>
#include <limits>
#include <optional>

namespace starcensus::photometry {

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
const WhiteDwarfPhotometry kNoPhotometry{kNaN, kNaN, kNaN, kNaN, kNaN, kNaN};

/// Cooling age between two models a fraction of the way from `a` to `b`: linear in log10 age when both
/// are positive (ages span decades between grid Teff), linear in age next to a zero-age model.
double interpolateAge(double a, double b, double fraction) {
    if (a > 0.0 && b > 0.0) {
        return std::pow(10.0, std::log10(a) + fraction * (std::log10(b) - std::log10(a)));
    }
    return a + fraction * (b - a);
}

/// Inverse of interpolateAge on [a, b]: the fraction at which it reaches `age`.
double ageFraction(double a, double b, double age) {
    if (a > 0.0 && b > 0.0) {
        return (std::log10(age) - std::log10(a)) / (std::log10(b) - std::log10(a));
    }
    return (age - a) / (b - a);
}

std::vector<WhiteDwarfModel> readModels(const std::string& path) {
    const auto table = TextTable::read(path);
    const auto teff = table.numbers("teff_k");
    const auto log_g = table.numbers("log_g");
    const auto mass = table.numbers("mass_msun");
    const auto abs_g = table.numbers("abs_g_mag");
    const auto abs_bp = table.numbers("abs_bp_mag");
    const auto abs_rp = table.numbers("abs_rp_mag");
    const auto age = table.numbers("cooling_age_yr");
    std::vector<WhiteDwarfModel> models;
    for (std::size_t row = 0; row < table.rowCount(); ++row) {
        models.push_back({teff[row], log_g[row], mass[row], abs_g[row], abs_bp[row], abs_rp[row], age[row]});
    }
    return models;
}
} // namespace

namespace detail {

/// The models of one atmosphere at one log g, sorted by Teff.
struct CoolingTrack {
    double log_g;
    std::vector<double> log_teff;
    std::vector<WhiteDwarfModel> models;
    // Cooling age made non-increasing with Teff (running minimum from the cool end), for the inversion.
    // The tables are monotone except one step of the DA log g 7.5 track (70000 K: 2.632e5 yr, 75000 K:
    // 2.801e5 yr), where this holds the age at 2.632e5 yr.
    std::vector<double> monotone_age_yr;
    std::vector<double> bp_rp_mag; // of each model
    // The reddest model: hotter than it, colour is single-valued in Teff (the coolest models turn blue).
    std::size_t reddest = 0;

    WhiteDwarfPhotometry at(double log_teff_k) const {
        if (!(log_teff_k >= log_teff.front() && log_teff_k <= log_teff.back())) {
            return kNoPhotometry;
        }
        auto upper = std::upper_bound(log_teff.begin(), log_teff.end(), log_teff_k);
        const std::size_t i = std::min<std::size_t>(upper - log_teff.begin(), log_teff.size() - 1);
        const double fraction = (log_teff_k - log_teff[i - 1]) / (log_teff[i] - log_teff[i - 1]);
        const WhiteDwarfModel& a = models[i - 1];
        const WhiteDwarfModel& b = models[i];
        const auto mix = [fraction](double x, double y) { return x + fraction * (y - x); };
        const double g = mix(a.abs_g_mag, b.abs_g_mag);
        const double bp = mix(a.abs_bp_mag, b.abs_bp_mag);
        const double rp = mix(a.abs_rp_mag, b.abs_rp_mag);
        return {g,
                bp,
                rp,
                bp - rp,
                mix(a.mass_msun, b.mass_msun),
                interpolateAge(a.cooling_age_yr, b.cooling_age_yr, fraction)};
    }

    /// log10 Teff at a cooling age (exact inverse of at()'s age interpolation); NaN if the age is
    /// older than the coolest or younger than the hottest model.
    double logTeffAtAge(double age_yr) const {
        if (!(age_yr >= 0.0)) {
            return kNaN;
        }
        // Ages fall with Teff: the first (coolest) model no older than age_yr, and the one before it.
        const auto first_younger = std::partition_point(monotone_age_yr.begin(), monotone_age_yr.end(),
                                                        [age_yr](double age) { return age > age_yr; });
        if (first_younger == monotone_age_yr.end()) {
            return kNaN;
        }
        const auto k = static_cast<std::size_t>(first_younger - monotone_age_yr.begin());
        if (monotone_age_yr[k] == age_yr) {
            return log_teff[k];
        }
        if (k == 0) {
            return kNaN;
        }
        const double fraction = ageFraction(monotone_age_yr[k - 1], monotone_age_yr[k], age_yr);
        return log_teff[k - 1] + fraction * (log_teff[k] - log_teff[k - 1]);
    }
};

struct WhiteDwarfGrid {
    std::vector<WhiteDwarfModel> models; // sorted by log g, then Teff
    std::vector<CoolingTrack> tracks;    // sorted by log g

    /// The two tracks bracketing log g and the fraction of the way from the first to the second;
    /// false outside the grid.
    bool bracket(double log_g, std::size_t& lower, double& fraction) const {
        if (!(log_g >= tracks.front().log_g && log_g <= tracks.back().log_g)) {
            return false;
        }
        lower = 0;
        while (lower + 2 < tracks.size() && log_g > tracks[lower + 1].log_g) {
            ++lower;
        }
        fraction = (log_g - tracks[lower].log_g) / (tracks[lower + 1].log_g - tracks[lower].log_g);
        return true;
    }
};

} // namespace detail

namespace {
std::shared_ptr<const detail::WhiteDwarfGrid> buildGrid(std::vector<WhiteDwarfModel> models,
                                                        const char* name) {
    std::sort(models.begin(), models.end(), [](const WhiteDwarfModel& a, const WhiteDwarfModel& b) {
        return a.log_g != b.log_g ? a.log_g < b.log_g : a.teff_k < b.teff_k;
    });
    auto grid = std::make_shared<detail::WhiteDwarfGrid>();
    for (const WhiteDwarfModel& model : models) {
        if (!(model.teff_k > 0.0) || std::isnan(model.log_g)) {
            throw InputError(std::string("white-dwarf models (") + name + "): a model has no Teff or log g");
        }
        if (grid->tracks.empty() || grid->tracks.back().log_g != model.log_g) {
            grid->tracks.push_back({model.log_g, {}, {}, {}, {}, 0});
        }
        auto& track = grid->tracks.back();
        if (!track.models.empty() && model.teff_k == track.models.back().teff_k) {
            throw InputError(std::string("white-dwarf models (") + name + "): repeated Teff at log g " +
                             std::to_string(model.log_g));
        }
        if (!(model.cooling_age_yr >= 0.0)) {
            throw InputError(std::string("white-dwarf models (") + name +
                             "): missing or negative cooling age");
        }
        track.monotone_age_yr.push_back(track.models.empty()
                                            ? model.cooling_age_yr
                                            : std::min(model.cooling_age_yr, track.monotone_age_yr.back()));
        track.log_teff.push_back(std::log10(model.teff_k));
        track.bp_rp_mag.push_back(model.abs_bp_mag - model.abs_rp_mag);
        if (track.bp_rp_mag.back() > track.bp_rp_mag[track.reddest]) {
            track.reddest = track.bp_rp_mag.size() - 1;
        }
        track.models.push_back(model);
    }
    if (grid->tracks.size() < 2 || std::any_of(grid->tracks.begin(), grid->tracks.end(),
                                               [](const auto& t) { return t.models.size() < 2; })) {
        throw InputError(std::string("white-dwarf models (") + name + "): need at least 2 log g x 2 Teff");
    }
    grid->models = std::move(models);
    return grid;
}
} // namespace

WhiteDwarfSequence WhiteDwarfSequence::load(const std::string& hydrogen_path,
                                            const std::string& helium_path) {
    return WhiteDwarfSequence(readModels(hydrogen_path), readModels(helium_path));
}

const WhiteDwarfSequence& WhiteDwarfSequence::shipped() {
    static const WhiteDwarfSequence sequence =
        load(dataFilePath("white_dwarf_montreal_da.txt"), dataFilePath("white_dwarf_montreal_db.txt"));
    return sequence;
}

WhiteDwarfSequence::WhiteDwarfSequence(std::vector<WhiteDwarfModel> hydrogen,
                                       std::vector<WhiteDwarfModel> helium)
    : grids_{buildGrid(std::move(hydrogen), "DA"), buildGrid(std::move(helium), "DB")} {}

const std::vector<WhiteDwarfModel>& WhiteDwarfSequence::models(WhiteDwarfAtmosphere atmosphere) const {
    return grids_[static_cast<std::size_t>(atmosphere)]->models;
}

WhiteDwarfPhotometry WhiteDwarfSequence::atTeff(double teff_k, double log_g,
                                                WhiteDwarfAtmosphere atmosphere) const {
    const auto& grid = *grids_[static_cast<std::size_t>(atmosphere)];
    std::size_t lower = 0;
    double fraction = 0.0;
    if (!(teff_k > 0.0) || !grid.bracket(log_g, lower, fraction)) {
        return kNoPhotometry;
    }
    const double log_teff = std::log10(teff_k);
    const WhiteDwarfPhotometry a = grid.tracks[lower].at(log_teff);
    const WhiteDwarfPhotometry b = grid.tracks[lower + 1].at(log_teff);
    const auto mix = [fraction](double x, double y) { return x + fraction * (y - x); };
    return {mix(a.abs_g_mag, b.abs_g_mag),   mix(a.abs_bp_mag, b.abs_bp_mag),
            mix(a.abs_rp_mag, b.abs_rp_mag), mix(a.bp_rp_mag, b.bp_rp_mag),
            mix(a.mass_msun, b.mass_msun),   interpolateAge(a.cooling_age_yr, b.cooling_age_yr, fraction)};
}

double WhiteDwarfSequence::teffAtCoolingAge(double cooling_age_yr, double log_g,
                                            WhiteDwarfAtmosphere atmosphere) const {
    const auto& grid = *grids_[static_cast<std::size_t>(atmosphere)];
    std::size_t lower = 0;
    double fraction = 0.0;
    if (!grid.bracket(log_g, lower, fraction)) {
        return kNaN;
    }
    // On a grid log g only that track counts (the other may not reach this age).
    const double a = fraction < 1.0 ? grid.tracks[lower].logTeffAtAge(cooling_age_yr) : 0.0;
    const double b = fraction > 0.0 ? grid.tracks[lower + 1].logTeffAtAge(cooling_age_yr) : 0.0;
    return std::pow(10.0, (1.0 - fraction) * a + fraction * b);
}

WhiteDwarfPhotometry WhiteDwarfSequence::atCoolingAge(double cooling_age_yr, double log_g,
                                                      WhiteDwarfAtmosphere atmosphere) const {
    return atTeff(teffAtCoolingAge(cooling_age_yr, log_g, atmosphere), log_g, atmosphere);
}

namespace {
/// M_G of a cooling sequence as a function of BP-RP on its hot-to-reddest branch.
detail::Curve coolingSequenceInColour(const WhiteDwarfSequence& white_dwarfs, double log_g,
                                      WhiteDwarfAtmosphere atmosphere) {
    std::vector<double> colours;
    std::vector<double> magnitudes;
    std::vector<double> teffs_k;
    for (const auto& model : white_dwarfs.models(atmosphere)) {
        teffs_k.push_back(model.teff_k);
    }
    std::sort(teffs_k.begin(), teffs_k.end(), std::greater<>());
    teffs_k.erase(std::unique(teffs_k.begin(), teffs_k.end()), teffs_k.end());
    for (double teff_k : teffs_k) { // hot to cool
        const auto photometry = white_dwarfs.atTeff(teff_k, log_g, atmosphere);
        colours.push_back(photometry.bp_rp_mag);
        magnitudes.push_back(photometry.abs_g_mag);
    }
    // Stop at the reddest model: the running maximum would otherwise resume on the blue-turning tail.
    const auto reddest = std::max_element(colours.begin(), colours.end(), [](double x, double y) {
        return std::isnan(x) || (!std::isnan(y) && x < y);
    });
    const auto keep = static_cast<std::size_t>(reddest - colours.begin()) + 1;
    colours.resize(keep);
    magnitudes.resize(keep);
    return detail::runningMaximumCurve(colours, magnitudes);
}
} // namespace

WhiteDwarfBoundary::WhiteDwarfBoundary(const DwarfLocus& locus, const WhiteDwarfSequence& white_dwarfs,
                                       const WhiteDwarfBoundarySettings& settings) {
    const std::array<detail::Curve, 2> sequences = {
        coolingSequenceInColour(white_dwarfs, settings.log_g, WhiteDwarfAtmosphere::Hydrogen),
        coolingSequenceInColour(white_dwarfs, settings.log_g, WhiteDwarfAtmosphere::Helium)};
    const auto [locus_blue, locus_red] = locus.invertibleRange(LocusQuantity::BpRpMag);
    // Copies of the bindings: clang before 16 cannot capture structured bindings.
    const auto locusAbsG = [&, blue = locus_blue, red = locus_red](double bp_rp_mag) {
        return locus.valueAtCode(LocusQuantity::AbsGMag,
                                 locus.codeFromBpRp(std::clamp(bp_rp_mag, blue, red)));
    };
    double last_offset_mag = kNaN; // boundary minus locus at the reddest colour with a cooling model
    const auto steps = static_cast<std::size_t>(
        std::lround((settings.bp_rp_max_mag - settings.bp_rp_min_mag) / settings.bp_rp_step_mag));
    for (std::size_t step = 0; step <= steps; ++step) {
        const double colour = settings.bp_rp_min_mag + settings.bp_rp_step_mag * static_cast<double>(step);
        double white_dwarf_g = kNaN;
        for (const auto& sequence : sequences) {
            const double g = sequence.at(std::max(colour, sequence.x.front()));
            if (!std::isnan(g) && !(g >= white_dwarf_g)) {
                white_dwarf_g = g; // the brighter sequence
            }
        }
        const double dwarf_g = locusAbsG(colour);
        if (!std::isnan(white_dwarf_g)) {
            last_offset_mag = settings.fraction_toward_white_dwarfs * (white_dwarf_g - dwarf_g);
        }
        curve_.x.push_back(colour);
        curve_.y.push_back(dwarf_g + last_offset_mag);
    }
    curve_.buildIndex();
}

WhiteDwarfParameters WhiteDwarfSequence::fromColourMagnitude(double bp_rp_mag, double abs_g_mag,
                                                             WhiteDwarfAtmosphere atmosphere) const {
    struct TrackPoint {
        double log_g, log_teff, mass_msun, abs_g_mag;
    };
    // One point per log g track where the track crosses the object's colour; tracks run in increasing
    // log g, and higher log g is fainter at a given colour, so the first two consecutive crossings that
    // bracket the object's M_G are interpolated in M_G. Called for every re-measurement of every white
    // dwarf and for every white-dwarf cell of the class grid: no allocation, one pow() per call.
    std::optional<TrackPoint> first, previous;
    for (const detail::CoolingTrack& track : grids_[static_cast<std::size_t>(atmosphere)]->tracks) {
        std::optional<TrackPoint> crossing;
        const std::vector<double>& colours = track.bp_rp_mag;
        for (std::size_t k = track.reddest; k + 1 < colours.size(); ++k) {
            const double red = colours[k];
            const double blue = colours[k + 1];
            if (bp_rp_mag <= red && bp_rp_mag >= blue && red > blue) {
                const double t = (red - bp_rp_mag) / (red - blue);
                const WhiteDwarfModel& a = track.models[k];
                const WhiteDwarfModel& b = track.models[k + 1];
                crossing = TrackPoint{track.log_g,
                                      track.log_teff[k] + t * (track.log_teff[k + 1] - track.log_teff[k]),
                                      a.mass_msun + t * (b.mass_msun - a.mass_msun),
                                      a.abs_g_mag + t * (b.abs_g_mag - a.abs_g_mag)};
                break;
            }
        }
        if (!crossing) {
            continue;
        }
        if (previous && abs_g_mag >= previous->abs_g_mag && abs_g_mag <= crossing->abs_g_mag &&
            crossing->abs_g_mag > previous->abs_g_mag) {
            const TrackPoint& low = *previous;
            const TrackPoint& high = *crossing;
            const double t = (abs_g_mag - low.abs_g_mag) / (high.abs_g_mag - low.abs_g_mag);
            return {std::pow(10.0, low.log_teff + t * (high.log_teff - low.log_teff)),
                    low.log_g + t * (high.log_g - low.log_g),
                    low.mass_msun + t * (high.mass_msun - low.mass_msun), true};
        }
        if (!first) {
            first = crossing;
        }
        previous = crossing;
    }
    if (!first) {
        return {kNaN, kNaN, kNaN, false};
    }
    const TrackPoint& nearest = abs_g_mag < first->abs_g_mag ? *first : *previous;
    return {std::pow(10.0, nearest.log_teff), nearest.log_g, nearest.mass_msun, false};
}

} // namespace starcensus::photometry
