#include "photometry/Classifier.h"

#include <algorithm>

namespace starcensus::photometry {

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kFirstNearInfraredCode = 60.0; // M0V: brown-dwarf confusion starts in the late M dwarfs
constexpr double kNearInfraredCodesPerSubtype = 10.0; // sampling of the locus: 0.1 subtype
constexpr double kNearInfraredCodeStep = 1.0 / kNearInfraredCodesPerSubtype;
constexpr std::uint16_t bit(ClassificationFlag flag) {
    return flagBit(flag);
}
} // namespace

PhotometricInput photometricInput(const CatalogRow& row) {
    PhotometricInput input;
    input.g_mag = row.g_mag;
    input.bp_mag = row.bp_mag;
    input.rp_mag = row.rp_mag;
    input.j_mag = row.j_mag;
    input.ks_mag = row.ks_mag;
    input.v_mag = row.v_mag;
    input.w1_mag = row.w1_mag;
    input.w2_mag = row.w2_mag;
    input.b_mag = row.b_mag;
    input.h_mag = row.h_mag;
    input.b_error_mag = row.b_error_mag;
    input.v_error_mag = row.v_error_mag;
    input.j_error_mag = row.j_error_mag;
    input.h_error_mag = row.h_error_mag;
    input.ks_error_mag = row.ks_error_mag;
    input.w1_error_mag = row.w1_error_mag;
    input.w2_error_mag = row.w2_error_mag;
    input.parallax_mas = row.parallax_mas;
    input.parallax_error_mas = row.parallax_error_mas;
    return input;
}

bool hasClassifiableBands(const PhotometricInput& input) {
    const int other_bands = std::isnan(input.b_mag) + std::isnan(input.v_mag) + std::isnan(input.h_mag) +
                            std::isnan(input.ks_mag) + std::isnan(input.w1_mag) + std::isnan(input.w2_mag);
    return !std::isnan(input.g_mag) || !std::isnan(input.j_mag) || other_bands <= 6 - 2;
}

AbsoluteMagnitude absoluteMagnitude(double apparent_mag, double parallax_mas, double parallax_error_mas) {
    if (!(parallax_mas > 0.0)) {
        return {kNaN, kNaN};
    }
    return {apparent_mag + 5.0 * std::log10(parallax_mas) - 10.0,
            5.0 / std::log(10.0) * parallax_error_mas / parallax_mas};
}

Category censusCategory(const Classification& result) {
    if (result.stellar_class != StellarClass::Unclassified) {
        return categoryOf(result.stellar_class, result.spectral_code);
    }
    return unclassifiedCategory(
        hasFlag(result.flags, ClassificationFlag::LowParallaxSnr) ? UnclassifiedReason::LowParallaxSnr
        : hasFlag(result.flags, ClassificationFlag::NoUsableBand) ? UnclassifiedReason::NoPhotometry
                                                                  : UnclassifiedReason::OutsideLoci);
}

Classifier::Classifier(const DwarfLocus& locus, const WhiteDwarfSequence& white_dwarfs,
                       const BandMatcher& band_matcher, ClassifierSettings settings)
    : locus_(locus), white_dwarfs_(white_dwarfs), band_matcher_(band_matcher), settings_(settings),
      white_dwarf_boundary_(locus, white_dwarfs, settings.white_dwarf_boundary),
      locus_bp_rp_range_mag_(locus.invertibleRange(LocusQuantity::BpRpMag)),
      locus_abs_g_range_mag_(locus.invertibleRange(LocusQuantity::AbsGMag)),
      locus_v_ks_range_mag_(locus.invertibleRange(LocusQuantity::VKsMag)),
      evolved_red_v_ks_mag_(
          locus.valueAtCode(LocusQuantity::VKsMag, locus.codeFromBpRp(settings.evolved_red_bp_rp_mag))) {
    const double last_code = locus.points().back().spectral_code;
    for (int step = 0; kFirstNearInfraredCode + step * kNearInfraredCodeStep <= last_code; ++step) {
        const double code = kFirstNearInfraredCode + step / kNearInfraredCodesPerSubtype;
        const double j_ks = locus.valueAtCode(LocusQuantity::JKsMag, code);
        const double abs_j = locus.valueAtCode(LocusQuantity::AbsJMag, code);
        if (!std::isnan(j_ks) && !std::isnan(abs_j)) {
            near_infrared_locus_.push_back(
                {abs_j / settings_.nir_magnitude_scale_mag, j_ks / settings_.nir_colour_scale_mag, code});
        }
        if (const double w1_w2 = locus.valueAtCode(LocusQuantity::W1W2Mag, code); !std::isnan(w1_w2)) {
            mid_infrared_locus_.push_back(
                {abs_j / settings_.nir_magnitude_scale_mag, w1_w2 / settings_.mir_colour_scale_mag, code});
        }
    }
    std::sort(near_infrared_locus_.begin(), near_infrared_locus_.end(),
              [](const NearInfraredPoint& a, const NearInfraredPoint& b) {
                  return a.scaled_abs_j != b.scaled_abs_j ? a.scaled_abs_j < b.scaled_abs_j
                                                          : a.spectral_code < b.spectral_code;
              });
}

const Classifier& Classifier::shipped() {
    static const Classifier classifier(DwarfLocus::shipped(), WhiteDwarfSequence::shipped(),
                                       BandMatcher::shipped());
    return classifier;
}

Classifier::PlacedPhotometry Classifier::place(const PhotometricInput& input) const {
    double modulus = input.distance_modulus_mag;
    double modulus_error = 0.0;
    std::uint16_t flags = 0;
    if (std::isnan(modulus)) {
        const AbsoluteMagnitude zero_point =
            absoluteMagnitude(0.0, input.parallax_mas, input.parallax_error_mas);
        modulus = -zero_point.mag;
        modulus_error = zero_point.error_mag;
        if (!(input.parallax_mas >= settings_.min_parallax_snr * input.parallax_error_mas)) {
            flags |= bit(ClassificationFlag::LowParallaxSnr);
        }
    }
    if (!hasClassifiableBands(input)) {
        flags |= bit(ClassificationFlag::NoUsableBand);
    }
    AbsolutePhotometry photometry;
    photometry.abs_g_mag = input.g_mag - modulus;
    photometry.bp_rp_mag = input.bp_mag - input.rp_mag;
    photometry.g_rp_mag = input.g_mag - input.rp_mag;
    photometry.w1_w2_mag = input.w1_mag - input.w2_mag;
    BandMatchInput& bands = photometry.bands;
    const auto set = [&](MatchBand band, double apparent_mag, double error_mag) {
        bands[band] = apparent_mag - modulus;
        bands.error_mag[static_cast<std::size_t>(band)] = error_mag;
    };
    set(MatchBand::B, input.b_mag, input.b_error_mag);
    set(MatchBand::V, input.v_mag, input.v_error_mag);
    set(MatchBand::J, input.j_mag, input.j_error_mag);
    set(MatchBand::H, input.h_mag, input.h_error_mag);
    set(MatchBand::Ks, input.ks_mag, input.ks_error_mag);
    set(MatchBand::W1, input.w1_mag, input.w1_error_mag);
    set(MatchBand::W2, input.w2_mag, input.w2_error_mag);
    bands.modulus_error_mag = std::isnan(modulus_error) ? 0.0 : modulus_error;
    return {photometry, modulus_error, flags};
}

Classification Classifier::classify(const PhotometricInput& input) const {
    const PlacedPhotometry placed = place(input);
    Classification result = classifyAbsolute(placed.photometry);
    result.abs_g_error_mag = std::isnan(result.abs_g_mag) ? kNaN : placed.modulus_error_mag;
    result.flags |= placed.flags;
    return result;
}

void Classifier::censusCategoriesAt(PhotometricInput input, std::span<const float> moduli,
                                    std::span<Category> categories) const {
    // At modulus 0 the "absolute" magnitudes are the apparent ones, so each distance's are apparent -
    // modulus, computed as place() computes them; a given modulus carries no error and no S/N flag.
    input.distance_modulus_mag = 0.0;
    const PlacedPhotometry apparent = place(input);
    const ColourTerms colour = colourTerms(apparent.photometry.bp_rp_mag); // the same at every distance
    for (std::size_t k = 0; k < moduli.size(); ++k) {
        AbsolutePhotometry photometry = apparent.photometry;
        photometry.abs_g_mag -= moduli[k];
        for (double& abs_mag : photometry.bands.abs_mag) {
            abs_mag -= moduli[k];
        }
        Classification result = classOf(photometry, colour);
        result.flags |= apparent.flags;
        categories[k] = censusCategory(result);
    }
}

Classification Classifier::classifyAbsolute(double abs_g_mag, double bp_rp_mag, double g_rp_mag,
                                            double abs_j_mag, double j_ks_mag, double w1_w2_mag,
                                            double abs_v_mag, double v_ks_mag) const {
    AbsolutePhotometry photometry;
    photometry.abs_g_mag = abs_g_mag;
    photometry.bp_rp_mag = bp_rp_mag;
    photometry.g_rp_mag = g_rp_mag;
    photometry.w1_w2_mag = w1_w2_mag;
    photometry.bands[MatchBand::J] = abs_j_mag;
    photometry.bands[MatchBand::V] = abs_v_mag;
    const double abs_ks_from_j = abs_j_mag - j_ks_mag;
    photometry.bands[MatchBand::Ks] = std::isnan(abs_ks_from_j) ? abs_v_mag - v_ks_mag : abs_ks_from_j;
    return classifyAbsolute(photometry);
}

Classification Classifier::classifyAbsolute(const AbsolutePhotometry& photometry) const {
    Classification result = classOf(photometry, colourTerms(photometry.bp_rp_mag));
    if (result.stellar_class == StellarClass::WhiteDwarf && !std::isnan(result.bp_rp_mag)) {
        // Teff and mass from the hydrogen-atmosphere (DA) grid, the common case (~80% of white dwarfs,
        // from memory); a helium atmosphere would give a somewhat different Teff at the same colour.
        const WhiteDwarfParameters parameters = white_dwarfs_.fromColourMagnitude(
            result.bp_rp_mag, result.abs_g_mag, WhiteDwarfAtmosphere::Hydrogen);
        result.teff_k = parameters.teff_k;
        result.mass_msun = parameters.mass_msun;
        if (!parameters.inside_grid) {
            result.flags |= bit(ClassificationFlag::OutsideLocus);
        }
    } else if (result.stellar_class != StellarClass::Evolved && !std::isnan(result.spectral_code) &&
               !hasFlag(result.flags, ClassificationFlag::BandMatch)) {
        result.teff_k = locus_.valueAtCode(LocusQuantity::TeffK, result.spectral_code);
        result.mass_msun = locus_.valueAtCode(LocusQuantity::MassMsun, result.spectral_code);
    }
    return result;
}

Classification Classifier::classifyClassOnly(double abs_g_mag, double bp_rp_mag) const {
    AbsolutePhotometry photometry;
    photometry.abs_g_mag = abs_g_mag;
    photometry.bp_rp_mag = bp_rp_mag;
    return classOf(photometry, colourTerms(bp_rp_mag));
}

Classifier::ColourTerms Classifier::colourTerms(double bp_rp_mag) const {
    ColourTerms terms;
    if (std::isnan(bp_rp_mag)) {
        return terms;
    }
    const auto [blue_end, red_end] = locus_bp_rp_range_mag_;
    terms.colour_code = locus_.codeFromBpRp(std::clamp(bp_rp_mag, blue_end, red_end));
    terms.locus_abs_g_mag = locus_.valueAtCode(LocusQuantity::AbsGMag, terms.colour_code);
    if (bp_rp_mag <= settings_.white_dwarf_max_bp_rp_mag) {
        terms.white_dwarf_boundary_abs_g = white_dwarf_boundary_.absGMag(bp_rp_mag);
    }
    return terms;
}

Classification Classifier::classOf(const AbsolutePhotometry& photometry, const ColourTerms& colour) const {
    Classification result;
    const double abs_g_mag = photometry.abs_g_mag;
    const double bp_rp_mag = photometry.bp_rp_mag;
    const double abs_j_mag = photometry.bands[MatchBand::J];
    const double j_ks_mag = abs_j_mag - photometry.bands[MatchBand::Ks];
    result.abs_g_mag = abs_g_mag;
    result.bp_rp_mag = bp_rp_mag;
    result.g_rp_mag = photometry.g_rp_mag;
    result.j_ks_mag = j_ks_mag;
    if (std::isnan(abs_g_mag)) {
        result.flags |= bit(ClassificationFlag::NoAbsoluteMagnitude);
    }
    if (usesBandMatch(photometry)) {
        classifyWithBandMatch(result, photometry.bands);
        return result;
    }
    if (std::isnan(abs_g_mag)) {
        return result; // without G and without bands for a match (one band of B, V, H, Ks, W1, W2 at most)
    }
    if (std::isnan(bp_rp_mag)) {
        classifyWithoutColour(result, abs_j_mag);
    } else {
        classifyWithColour(result, colour);
    }
    const bool late = result.spectral_code >= 70.0 || abs_g_mag > settings_.late_type_abs_g_mag ||
                      (std::isnan(bp_rp_mag) && result.stellar_class == StellarClass::Unclassified);
    if (late && result.stellar_class != StellarClass::WhiteDwarf &&
        result.stellar_class != StellarClass::Evolved) {
        classifyNearInfrared(result, abs_j_mag, j_ks_mag, photometry.w1_w2_mag);
    }
    return result;
}

bool Classifier::usesBandMatch(const AbsolutePhotometry& photometry) {
    const BandMatchInput& bands = photometry.bands;
    const bool johnson = !std::isnan(bands[MatchBand::B]) || !std::isnan(bands[MatchBand::V]);
    return std::isnan(photometry.bp_rp_mag) && (std::isnan(photometry.abs_g_mag) || johnson) &&
           (bands.bandCount() >= 2 || !std::isnan(bands[MatchBand::J]));
}

void Classifier::classifyWithBandMatch(Classification& result, const BandMatchInput& bands) const {
    const double abs_v_mag = bands[MatchBand::V];
    if (decideFromJohnsonColour(result, abs_v_mag, abs_v_mag - bands[MatchBand::Ks])) {
        return;
    }
    const auto acceptable = [&](const BandMatchResult& match, int band_count) {
        return match.chi_squared <= settings_.max_match_chi_squared_per_band * band_count;
    };
    const int band_count = bands.bandCount();
    BandMatchInput used = bands; // the bands of the match adopted
    BandMatchResult match = band_matcher_.match(bands);
    if (!acceptable(match, band_count) && band_count >= 3) {
        // Bands may disagree with the rest for reasons no relation describes: an upper limit quoted as a
        // magnitude, a variable, or a wrong cross-match that brings a whole survey's bands from another
        // source. Try the match without each band, and without each survey (Johnson B V; 2MASS J H Ks;
        // WISE W1 W2), keeping at least two bands; the acceptable one with the smallest chi^2 per band wins.
        // Masks of MatchBand bits: each band alone, then the three surveys.
        static constexpr std::array<std::uint8_t, kMatchBandCount + 3> kLeftOut = {
            1u << 0, 1u << 1, 1u << 2, 1u << 3, 1u << 4, 1u << 5, 1u << 6, 0b0000011, 0b0011100, 0b1100000};
        double best_reduced_chi_squared = std::numeric_limits<double>::infinity();
        for (const std::uint8_t mask : kLeftOut) {
            BandMatchInput without = bands;
            for (std::size_t b = 0; b < kMatchBandCount; ++b) {
                if ((mask >> b) & 1u) {
                    without.abs_mag[b] = kNaN;
                }
            }
            const int remaining = without.bandCount();
            if (remaining == band_count || remaining < 2) {
                continue;
            }
            const BandMatchResult candidate = band_matcher_.match(without);
            if (acceptable(candidate, remaining) &&
                candidate.chi_squared / remaining < best_reduced_chi_squared) {
                best_reduced_chi_squared = candidate.chi_squared / remaining;
                match = candidate;
                used = without;
                result.flags |= bit(ClassificationFlag::BandLeftOut);
            }
        }
    }
    if (!acceptable(match, used.bandCount())) {
        result.flags |= bit(ClassificationFlag::OutsideLocus);
        return;
    }
    result.flags |= bit(ClassificationFlag::BandMatch);
    const double used_abs_v_mag = used[MatchBand::V];
    const bool johnson = !std::isnan(used[MatchBand::B]) || !std::isnan(used_abs_v_mag);
    result.flags |= johnson ? bit(ClassificationFlag::JohnsonColour) : bit(ClassificationFlag::NearInfrared);
    result.match_chi_squared = match.chi_squared;
    result.code_low = match.code_low;
    result.code_high = match.code_high;
    if (const double locus_abs_v = locus_.valueAtCode(LocusQuantity::AbsVMag, match.spectral_code);
        !std::isnan(used_abs_v_mag - locus_abs_v)) {
        result.flags |= mainSequenceOffsetFlags(used_abs_v_mag - locus_abs_v);
    }
    setDwarf(result, match.spectral_code);
    // Teff and mass from the unrounded minimum: half-subtype steps would hide errors of a few hundredths.
    result.teff_k = locus_.valueAtCode(LocusQuantity::TeffK, match.grid_code);
    result.mass_msun = locus_.valueAtCode(LocusQuantity::MassMsun, match.grid_code);
}

void Classifier::setDwarf(Classification& result, double spectral_code) const {
    result.spectral_code = spectral_code;
    result.stellar_class =
        std::isnan(spectral_code) ? StellarClass::Unclassified : dwarfClassOfCode(spectral_code);
}

void Classifier::classifyWithColour(Classification& result, const ColourTerms& terms) const {
    const double abs_g = result.abs_g_mag;
    const double colour = result.bp_rp_mag;
    const auto [blue_end, red_end] = locus_bp_rp_range_mag_;
    const double colour_code = terms.colour_code;
    result.locus_offset_mag = abs_g - terms.locus_abs_g_mag;

    if (colour <= settings_.white_dwarf_max_bp_rp_mag && abs_g > terms.white_dwarf_boundary_abs_g) {
        result.stellar_class = StellarClass::WhiteDwarf;
        return;
    }
    if (colour < blue_end) {
        // Bluer than B9V: hot main-sequence stars are brighter than the bluest locus row; between them
        // and the white-dwarf boundary (hot subdwarfs) nothing on the locus fits.
        result.flags |= bit(ClassificationFlag::OutsideLocus);
        if (result.locus_offset_mag > settings_.binary_band_mag) {
            return;
        }
        const double code_from_g = locus_.codeFromAbsG(std::max(abs_g, locus_abs_g_range_mag_[0]));
        setDwarf(result, std::min(code_from_g, colour_code));
        return;
    }
    if (result.locus_offset_mag < -evolvedOffsetMag(colour > settings_.evolved_red_bp_rp_mag)) {
        result.stellar_class = StellarClass::Evolved;
        result.spectral_code = colour_code; // the dwarf type of the same colour
        return;
    }
    double code = colour_code;
    if (colour > settings_.saturated_bp_rp_mag) {
        const double code_from_g = locus_.codeFromAbsG(abs_g);
        if (abs_g > locus_abs_g_range_mag_[1]) {
            result.flags |= bit(ClassificationFlag::OutsideLocus); // fainter than the last M_G row (L8V)
            code = locus_.codeFromAbsG(locus_abs_g_range_mag_[1]);
        } else if (code_from_g > code) {
            code = code_from_g;
        }
        // Compare the magnitude with the locus at the adopted code, not at the saturated colour.
        result.locus_offset_mag = abs_g - locus_.valueAtCode(LocusQuantity::AbsGMag, code);
    }
    if (colour > red_end) {
        result.flags |= bit(ClassificationFlag::OutsideLocus);
    }
    result.flags |= mainSequenceOffsetFlags(result.locus_offset_mag);
    setDwarf(result, code);
}

double Classifier::evolvedOffsetMag(bool redder_than_evolved_red_colour) const {
    return redder_than_evolved_red_colour ? settings_.evolved_offset_red_mag : settings_.evolved_offset_mag;
}

std::uint16_t Classifier::mainSequenceOffsetFlags(double offset_mag) const {
    if (offset_mag < -settings_.binary_band_mag) {
        return bit(ClassificationFlag::AboveBinaryBand);
    }
    return offset_mag > settings_.subluminous_offset_mag ? bit(ClassificationFlag::BelowLocus) : 0;
}

bool Classifier::decideFromJohnsonColour(Classification& result, double abs_v_mag, double v_ks_mag) const {
    const auto [blue_end, red_end] = locus_v_ks_range_mag_;
    if (std::isnan(abs_v_mag) || !(v_ks_mag <= red_end)) {
        return false; // no V-Ks, or redder than the locus's last V-Ks (L4V): a dwarf, for the match to type
    }
    const double colour_code = locus_.codeAtValue(LocusQuantity::VKsMag, std::max(v_ks_mag, blue_end));
    const double offset_mag = abs_v_mag - locus_.valueAtCode(LocusQuantity::AbsVMag, colour_code);
    if (offset_mag > settings_.white_dwarf_v_offset_mag) {
        result.flags |= bit(ClassificationFlag::JohnsonColour);
        result.stellar_class = StellarClass::WhiteDwarf;
        return true;
    }
    if (v_ks_mag < blue_end) {
        result.flags |= bit(ClassificationFlag::JohnsonColour) | bit(ClassificationFlag::OutsideLocus);
        return true; // bluer than O9V and not a white dwarf
    }
    if (offset_mag < -evolvedOffsetMag(v_ks_mag > evolved_red_v_ks_mag_)) {
        result.flags |= bit(ClassificationFlag::JohnsonColour);
        result.stellar_class = StellarClass::Evolved;
        result.spectral_code = colour_code; // the dwarf type of the same colour
        return true;
    }
    return false;
}

void Classifier::classifyWithoutColour(Classification& result, double abs_j_mag) const {
    result.flags |= bit(ClassificationFlag::NoColour);
    const double abs_g = result.abs_g_mag;
    const auto [bright_end, faint_end] = locus_abs_g_range_mag_;
    const bool red = result.g_rp_mag > settings_.t_dwarf_min_g_rp_mag ||
                     abs_g - abs_j_mag > settings_.t_dwarf_min_g_j_mag; // false for NaN colours
    if (abs_g > faint_end && red) {
        // Fainter in M_G than the last tabulated dwarf (L8V) and red: a T dwarf (or later). The subtype
        // comes from M_J where the locus is monotonic in it (T5V onward), else it stays unknown.
        result.flags |= bit(ClassificationFlag::OutsideLocus);
        const double code = locus_.codeAtValue(LocusQuantity::AbsJMag, abs_j_mag);
        if (code >= 85.0) {
            setDwarf(result, code);
        } else {
            result.stellar_class = StellarClass::T;
        }
        return;
    }
    if (abs_g < bright_end || abs_g > faint_end) {
        result.flags |= bit(ClassificationFlag::OutsideLocus);
        return;
    }
    const double code = locus_.codeFromAbsG(abs_g);
    const double locus_g_rp = locus_.valueAtCode(LocusQuantity::GRpMag, code);
    if (result.g_rp_mag < locus_g_rp - settings_.g_rp_tolerance_mag) {
        result.flags |= bit(ClassificationFlag::OutsideLocus); // too blue for a dwarf of this M_G
        return;
    }
    result.locus_offset_mag = 0.0;
    setDwarf(result, code);
}

void Classifier::classifyNearInfrared(Classification& result, double abs_j_mag, double j_ks_mag,
                                      double w1_w2_mag) const {
    if (std::isnan(abs_j_mag) || std::isnan(j_ks_mag)) {
        classifyMidInfrared(result, abs_j_mag, w1_w2_mag);
        return;
    }
    // Nearest locus point in the scaled (J-Ks, M_J) plane; equal distances go to the earlier subtype.
    // Walking outward from the object's M_J, a point whose M_J difference alone is farther than the best
    // so far cannot win, and neither can any point beyond it.
    const double y = abs_j_mag / settings_.nir_magnitude_scale_mag;
    const double x = j_ks_mag / settings_.nir_colour_scale_mag;
    double best_distance_squared = std::numeric_limits<double>::infinity();
    double best_code = kNaN;
    const auto consider = [&](const NearInfraredPoint& point) {
        const double dy = point.scaled_abs_j - y;
        if (dy * dy > best_distance_squared) {
            return false;
        }
        const double dx = point.scaled_j_ks - x;
        const double distance_squared = dx * dx + dy * dy;
        if (distance_squared < best_distance_squared ||
            (distance_squared == best_distance_squared && point.spectral_code < best_code)) {
            best_distance_squared = distance_squared;
            best_code = point.spectral_code;
        }
        return true;
    };
    const auto split = std::lower_bound(
        near_infrared_locus_.begin(), near_infrared_locus_.end(), y,
        [](const NearInfraredPoint& point, double value) { return point.scaled_abs_j < value; });
    for (auto fainter = split; fainter != near_infrared_locus_.end() && consider(*fainter);) {
        ++fainter;
    }
    for (auto brighter = split; brighter != near_infrared_locus_.begin() && consider(*(brighter - 1));) {
        --brighter;
    }
    acceptInfraredMatch(result, best_distance_squared, best_code);
}

void Classifier::classifyMidInfrared(Classification& result, double abs_j_mag, double w1_w2_mag) const {
    // Late objects with G but without J-Ks: the nearest locus point in the scaled (W1-W2, M_J) plane, or in
    // W1-W2 alone without J (the colour rises steadily from the late M dwarfs to Y4, Pecaut & Mamajek
    // table). W1-W2 scaled by mir_colour_scale_mag; the J-Ks path's M_J scale and distance limit.
    if (std::isnan(w1_w2_mag)) {
        return;
    }
    const bool with_j = !std::isnan(abs_j_mag);
    const double y = abs_j_mag / settings_.nir_magnitude_scale_mag;
    const double x = w1_w2_mag / settings_.mir_colour_scale_mag;
    double best_distance_squared = std::numeric_limits<double>::infinity();
    double best_code = kNaN;
    for (const MidInfraredPoint& point : mid_infrared_locus_) {
        if (with_j && std::isnan(point.scaled_abs_j)) {
            continue;
        }
        const double dx = point.scaled_w1_w2 - x;
        const double dy = with_j ? point.scaled_abs_j - y : 0.0;
        const double distance_squared = dx * dx + dy * dy;
        if (distance_squared < best_distance_squared) { // ties go to the earlier subtype (points ascend)
            best_distance_squared = distance_squared;
            best_code = point.spectral_code;
        }
    }
    acceptInfraredMatch(result, best_distance_squared, best_code);
}

void Classifier::acceptInfraredMatch(Classification& result, double distance_squared,
                                     double spectral_code) const {
    if (!(distance_squared <= settings_.nir_max_distance * settings_.nir_max_distance)) {
        return;
    }
    result.flags |= bit(ClassificationFlag::NearInfrared);
    result.flags &= static_cast<std::uint16_t>(~bit(ClassificationFlag::OutsideLocus));
    setDwarf(result, spectral_code);
}

} // namespace starcensus::photometry
