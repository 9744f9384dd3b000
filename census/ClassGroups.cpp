#include "census/ClassGroups.h"

#include "photometry/DwarfLocus.h"
#include "photometry/base/InputError.h"

#include <charconv>
#include <cmath>

namespace starcensus::census {

namespace {

std::string_view trim(std::string_view text) {
    while (!text.empty() && text.front() == ' ') {
        text.remove_prefix(1);
    }
    while (!text.empty() && text.back() == ' ') {
        text.remove_suffix(1);
    }
    return text;
}

bool parseRange(std::string_view text, double& low, double& high) {
    const auto dash = text.find('-', 1);
    if (dash == std::string_view::npos) {
        return false;
    }
    const auto parse = [](std::string_view number, double& value) {
        const auto [end, error] = std::from_chars(number.data(), number.data() + number.size(), value);
        return error == std::errc{} && end == number.data() + number.size();
    };
    return parse(text.substr(0, dash), low) && parse(text.substr(dash + 1), high) && low < high;
}

/// "teff:3000-4000" (K) or "mass:0.1-0.5" (Msun): the dwarf subtypes whose locus value at the middle of
/// the subtype lies in the range. False if the item is not of this form.
bool addLocusRange(ClassGroup& group, std::string_view item, std::string_view definition) {
    const auto colon = item.find(':');
    if (colon == std::string_view::npos) {
        return false;
    }
    const std::string_view quantity_name = item.substr(0, colon);
    photometry::LocusQuantity quantity;
    if (quantity_name == "teff") {
        quantity = photometry::LocusQuantity::TeffK;
    } else if (quantity_name == "mass") {
        quantity = photometry::LocusQuantity::MassMsun;
    } else {
        return false;
    }
    double low = 0.0;
    double high = 0.0;
    if (!parseRange(item.substr(colon + 1), low, high)) {
        throw InputError("class group '" + std::string(definition) + "': '" + std::string(item) +
                         "' needs a range LOW-HIGH, e.g. teff:3000-4000 (K) or mass:0.1-0.5 (Msun)");
    }
    const auto& locus = photometry::DwarfLocus::shipped();
    for (std::size_t c = 0; c < photometry::kDwarfCategories; ++c) {
        const double value = locus.valueAtCode(quantity, static_cast<double>(c) + 0.5);
        if (value >= low && value <= high) {
            group.categories.set(c);
        }
    }
    return true;
}

void addItem(ClassGroup& group, std::string_view item, std::string_view definition) {
    using photometry::Category;
    if (addLocusRange(group, item, definition)) {
        return;
    }
    if (const auto whole_class = photometry::classFromName(item)) {
        for (std::size_t c = 0; c < photometry::kCategoryCount; ++c) {
            if (photometry::classOfCategory(static_cast<Category>(c)) == *whole_class) {
                group.categories.set(c);
            }
        }
        return;
    }
    const auto dash = item.find('-');
    const auto first = photometry::parseSpectralType(item.substr(0, dash));
    const auto last =
        dash == std::string_view::npos ? first : photometry::parseSpectralType(item.substr(dash + 1));
    if (!first || !last || *last < *first) {
        throw InputError(
            "class group '" + std::string(definition) + "': '" + std::string(item) +
            "' is neither a class (O B A F G K M L T Y WD evolved unclassified) nor a subtype range "
            "such as M0-M4");
    }
    for (auto c = static_cast<std::size_t>(std::floor(*first));
         c <= static_cast<std::size_t>(std::floor(*last)); ++c) {
        group.categories.set(c);
    }
}

} // namespace

std::vector<ClassGroup> standardClassGroups() {
    std::vector<ClassGroup> groups;
    for (std::size_t c = 0; c < photometry::kClassCount; ++c) {
        groups.push_back(parseClassGroup(std::string(photometry::kClassNames[c]) + "=" +
                                         std::string(photometry::kClassNames[c])));
    }
    return groups;
}

ClassGroup parseClassGroup(std::string_view definition) {
    const auto equals = definition.find('=');
    if (equals == std::string_view::npos || trim(definition.substr(0, equals)).empty()) {
        throw InputError("class group '" + std::string(definition) + "': expected NAME=ITEM[,ITEM...]");
    }
    ClassGroup group{std::string(trim(definition.substr(0, equals))), {}};
    std::string_view items = definition.substr(equals + 1);
    while (!items.empty()) {
        const auto comma = items.find(',');
        addItem(group, trim(items.substr(0, comma)), definition);
        items = comma == std::string_view::npos ? std::string_view{} : items.substr(comma + 1);
    }
    if (group.categories.none()) {
        throw InputError("class group '" + std::string(definition) + "' has no members");
    }
    return group;
}

} // namespace starcensus::census
