#pragma once
// Command-line / config-file options owned by the census library: membership, quality cuts, the Monte
// Carlo and the reported classes. Each builder binds options to a settings struct; validate*() rejects
// values outside their ranges with an InputError naming the option.
#include "census/CatalogMerge.h"
#include "census/ClassGroups.h"
#include "census/Membership.h"
#include "census/MonteCarlo.h"
#include "census/QualityCuts.h"
#include "census/RowClassification.h"
#include "census/Systems.h"

#include <boost/program_options.hpp>

#include <string>
#include <utility>
#include <vector>

namespace starcensus::census {

/// Settings of one census run that come from options.
struct CensusSettings {
    std::string radii_text = "10";                   // --radius, comma-separated (pc)
    std::string prior_name = "constant-density";     // --distance-prior
    std::vector<std::string> group_definitions;      // --group NAME=ITEMS
    std::vector<std::string> file_epoch_definitions; // --file-epoch FILE=YEAR
    std::string spectral_types_name = "use";         // --spectral-types use|check|ignore
    MembershipSettings membership;
    QualitySettings quality;
    DrawSettings draws;
    CatalogMergeSettings merge; // file_epochs_yr is filled per run from file_epochs
    SystemSettings systems;     // threads are taken from draws
    bool find_systems = true;   // --no-systems turns the stellar-system census off

    // Filled by validate():
    std::vector<std::pair<std::string, double>> file_epochs; // (path as given, Julian year)
    std::vector<double> radii_pc;
    std::vector<ClassGroup> groups; // the standard classes followed by the user's groups
    SpectralTypePolicy spectral_types = SpectralTypePolicy::Use;
};

/// The classification rules of a validated census: zero point, S/N threshold, literature types.
RowClassRules rowClassRules(const CensusSettings& settings);

boost::program_options::options_description censusOptions(CensusSettings& settings);

/// A numeric option whose default is shown as written (%g), not with binary round-off.
boost::program_options::typed_value<double>* numberOption(double& target, const char* value_name);

/// Checks ranges and parses the radius list, prior and groups.
void validate(CensusSettings& settings);

/// "5,10,20" -> {5, 10, 20}; each must be a positive number; throws InputError naming `option`.
std::vector<double> parsePositiveList(const std::string& text, const std::string& option);

} // namespace starcensus::census
