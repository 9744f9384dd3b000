#include "census/ClassGroups.h"

#include "photometry/InputError.h"

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

void addItem(ClassGroup& group, std::string_view item, std::string_view definition) {
    using photometry::Category;
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
