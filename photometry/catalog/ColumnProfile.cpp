#include "photometry/catalog/ColumnProfile.h"

#include "photometry/catalog/CsvCatalog.h"
#include "photometry/catalog/FitsCatalog.h"
#include "photometry/catalog/VoTableCatalog.h"

#include <algorithm>

namespace starcensus::photometry {

std::string_view kindName(ColumnKind kind) {
    switch (kind) {
    case ColumnKind::Number:
        return "number";
    case ColumnKind::Text:
        return "text";
    case ColumnKind::Mixed:
        return "mixed";
    default:
        return "other";
    }
}

void ColumnProfile::countNumber(double value) {
    ++numbers;
    // min and max start as NaN, which every comparison fails.
    if (!(value >= min)) {
        min = value;
    }
    if (!(value <= max)) {
        max = value;
    }
}

void ColumnProfile::countText(std::string_view text) {
    ++texts;
    if (samples.size() < kSampleCount && std::find(samples.begin(), samples.end(), text) == samples.end()) {
        samples.emplace_back(text);
    }
}

void ColumnProfile::settleKindFromCells() {
    if (texts == 0) {
        kind = ColumnKind::Number;
    } else {
        kind = numbers == 0 ? ColumnKind::Text : ColumnKind::Mixed;
    }
}

TableProfile profileTable(const std::string& path, const std::string& hdu) {
    return isCsvPath(path)       ? detail::profileCsvTable(path)
           : isVoTablePath(path) ? detail::profileVoTable(path)
                                 : detail::profileFitsTable(path, hdu);
}

std::vector<ColumnDescription> descriptionsOf(const TableProfile& profile) {
    std::vector<ColumnDescription> descriptions;
    descriptions.reserve(profile.columns.size());
    for (const auto& column : profile.columns) {
        descriptions.push_back(column.description);
    }
    return descriptions;
}

} // namespace starcensus::photometry
