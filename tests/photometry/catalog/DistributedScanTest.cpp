#include "FitsFixture.h"

#include "photometry/base/ProcessGroup.h"
#include "photometry/catalog/CatalogScan.h"
#include "photometry/catalog/CatalogScanDetail.h"

#include <doctest/doctest.h>

#include <cstring>

using namespace starcensus;
using namespace starcensus::photometry;
using namespace starcensus::testing;

namespace {

/// Rank `rank` of `size` processes inside this one: ranks other than 0 leave their bytes in `sent`;
/// rank 0 (run last) receives them all, as MPI_Gather would give them.
class RecordedGroup final : public ProcessGroup {
  public:
    RecordedGroup(int rank, int size, std::vector<std::string>& sent)
        : rank_(rank), size_(size), sent_(sent) {}
    int rank() const override { return rank_; }
    int size() const override { return size_; }
    std::vector<std::string> gatherToRoot(const std::string& bytes) override {
        sent_[static_cast<std::size_t>(rank_)] = bytes;
        return rank_ == 0 ? sent_ : std::vector<std::string>{};
    }
    void gatherFailure(int, const std::string&) override { FAIL("no rank fails before the scan here"); }
    bool gathered() const override { return false; }

  private:
    int rank_;
    int size_;
    std::vector<std::string>& sent_;
};

/// The scan rank 0 of `size` processes returns, the other ranks run first.
CatalogScan scanOverRanks(int size, const std::vector<std::string>& paths, const ScanSettings& settings) {
    std::vector<std::string> sent(static_cast<std::size_t>(size));
    for (int rank = size - 1; rank > 0; --rank) {
        RecordedGroup group(rank, size, sent);
        CHECK(scanCatalogsAcross(group, paths, settings).candidates.empty());
    }
    RecordedGroup root(0, size, sent);
    return scanCatalogsAcross(root, paths, settings);
}

bool sameBits(double a, double b) {
    return std::memcmp(&a, &b, sizeof a) == 0;
} // NaN equals NaN

bool sameRows(const std::vector<CatalogRow>& a, const std::vector<CatalogRow>& b) {
    if (a.size() != b.size()) {
        return false;
    }
    for (std::size_t i = 0; i < a.size(); ++i) {
        for (std::size_t field = 0; field < kCatalogFieldCount; ++field) {
            const auto member = detail::rowMember(static_cast<CatalogField>(field));
            if (member && !sameBits(member.get(a[i]), member.get(b[i]))) {
                return false;
            }
        }
        if (a[i].source_id != b[i].source_id || !sameBits(a[i].literature_code, b[i].literature_code) ||
            a[i].literature_class != b[i].literature_class ||
            a[i].literature_status != b[i].literature_status || a[i].file_index != b[i].file_index ||
            a[i].row_index != b[i].row_index) {
            return false;
        }
    }
    return true;
}

} // namespace

TEST_CASE(
    "the scan over several processes gives exactly the one-process scan, large FITS files in row ranges") {
    const ScratchDirectory directory("starcensus-distributed");
    // A large FITS table (more than an even share of the bytes: cut into row ranges), a small one, a CSV.
    const std::string large = directory.file("large.fits");
    writeFitsTable(large, mixedTypeTable(20000, 1));
    const std::string small = directory.file("small.fits");
    writeFitsTable(small, mixedTypeTable(700, 2));
    const std::string text = directory.file("rows.csv");
    writeText(text,
              "source_id,parallax,parallax_error,phot_g_mean_mag\n1,150,0.1,9\n2,0.1,0.1,19\n3,,0.1,12\n");
    const std::vector<std::string> paths = {small, large, text};
    ScanSettings settings;
    settings.min_parallax_mas = 20.0;
    settings.threads = 2;
    settings.block_bytes = 64 << 10; // several blocks per row range
    const CatalogScan alone = scanCatalogs(paths, settings);
    REQUIRE(alone.candidates.size() > 100);
    for (const int ranks : {1, 2, 3, 5}) {
        CAPTURE(ranks);
        const CatalogScan spread = scanOverRanks(ranks, paths, settings);
        CHECK(sameRows(spread.candidates, alone.candidates));
        CHECK(spread.totals == alone.totals);
        REQUIRE(spread.files.size() == alone.files.size());
        for (std::size_t f = 0; f < paths.size(); ++f) {
            const FileScanReport& a = alone.files[f];
            const FileScanReport& b = spread.files[f];
            CHECK(b.path == a.path);
            CHECK(b.hdu_index == a.hdu_index);
            CHECK(b.hdu_name == a.hdu_name);
            CHECK(b.rows == a.rows);
            CHECK(b.counts == a.counts);
            CHECK(b.null_counts == a.null_counts);
            CHECK(sameBits(b.parallax_min_mas, a.parallax_min_mas));
            CHECK(sameBits(b.parallax_max_mas, a.parallax_max_mas));
            CHECK(b.warnings == a.warnings);
            for (std::size_t field = 0; field < kCatalogFieldCount; ++field) {
                const auto& ma = a.mapping.fields[field];
                const auto& mb = b.mapping.fields[field];
                REQUIRE(ma.has_value() == mb.has_value());
                if (ma) {
                    CHECK(mb->column_name == ma->column_name);
                    CHECK(mb->matched_by == ma->matched_by);
                    CHECK(mb->unit_source == ma->unit_source);
                    CHECK(mb->scale_to_canonical == ma->scale_to_canonical);
                }
            }
        }
    }
}

TEST_CASE("the scan over several processes throws the first failing file's error, as one process does") {
    const ScratchDirectory directory("starcensus-distributed");
    const std::string good = directory.file("good.fits");
    writeFitsTable(good, mixedTypeTable(3000, 3));
    const std::string bad = directory.file("bad.csv");
    writeText(bad, "parallax,parallax_error\n1,0.1\n2\n");
    const std::string missing = directory.file("missing.csv");
    const std::vector<std::string> paths = {good, bad, missing};
    const ScanSettings settings;
    const std::string expected = inputErrorOf([&] { scanCatalogs(paths, settings); });
    CHECK(expected == bad + " line 3: 1 fields, the header has 2");
    CHECK(inputErrorOf([&] { scanOverRanks(3, paths, settings); }) == expected);
}
