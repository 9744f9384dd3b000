#pragma once
// Internals shared by the FITS and CSV readers: the per-file result and the row bookkeeping every reader
// applies in the same way (null counts, candidate test, counters, warnings).
#include "photometry/CatalogScan.h"

#include <vector>

namespace starcensus::photometry::detail {

struct FileScanResult {
    FileScanReport report;
    std::vector<CatalogRow> candidates;
};

/// The CatalogRow member of a floating-point field; nullptr for source_id.
double CatalogRow::*rowMember(CatalogField field);

/// Applies the candidate test of CatalogScan.h to decoded rows and keeps the counts. The report's
/// mapping must be set before construction.
class ScanAccumulator {
  public:
    ScanAccumulator(FileScanResult& result, const ScanSettings& settings);

    /// One decoded row: every mapped field filled (canonical units), the others missing.
    void add(const CatalogRow& row);
    /// Adds the warnings that depend on the whole file; `where` names the file (and HDU).
    void finish(const std::string& where);

  private:
    struct MappedField {
        std::size_t index;
        double CatalogRow::*member;
    };
    FileScanResult& result_;
    std::vector<MappedField> mapped_doubles_;
    bool source_id_mapped_ = false;
    double min_parallax_mas_;
    double candidate_sigma_;
    bool keep_candidates_;
};

} // namespace starcensus::photometry::detail
