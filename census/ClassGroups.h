#pragma once
// What the census reports: the MK classes, white dwarfs, evolved and unclassified objects, and groups a
// user defines as unions of classes, subtype ranges and locus Teff or mass ranges, e.g. "FGK=F,G,K",
// "earlyM=M0-M4" or "sunlike=teff:5300-6000".
#include "photometry/StellarClass.h"

#include <bitset>
#include <string>
#include <string_view>
#include <vector>

namespace starcensus::census {

struct ClassGroup {
    std::string name;
    std::bitset<photometry::kCategoryCount> categories;
};

/// One group per StellarClass, in enum order: O B A F G K M L T Y WD evolved unclassified.
std::vector<ClassGroup> standardClassGroups();

/// Parses "NAME=ITEM[,ITEM...]" where an ITEM is a class name (G, WD, evolved, unclassified), a range of
/// dwarf subtypes "M0-M4" (whole subtypes, both ends included), or a range of locus Teff or mass,
/// "teff:3000-4000" (K) or "mass:0.1-0.5" (Msun), which takes the dwarf subtypes whose Pecaut & Mamajek
/// locus value at mid-subtype lies inside. Throws InputError naming the definition.
ClassGroup parseClassGroup(std::string_view definition);

} // namespace starcensus::census
