// scanCatalogsAcross: the scan dealt out over the processes of a ProcessGroup (CatalogScan.h). The parts
// are planned the same way on every rank from the paths and file sizes alone, so no plan is sent; each
// rank sends its parts' results to rank 0 as bytes (packed below), where they are put back in file and row
// order and assembled exactly as scanCatalogs assembles them. The ranks are assumed to run the same build
// on machines of the same byte order (an MPI job's usual case): rows travel as their in-memory bytes.
#include "photometry/base/InputError.h"
#include "photometry/base/ProcessGroup.h"
#include "photometry/base/Threads.h"
#include "photometry/catalog/CatalogScan.h"
#include "photometry/catalog/CatalogScanDetail.h"
#include "photometry/catalog/CsvCatalog.h"
#include "photometry/catalog/VoTableCatalog.h"

#include <algorithm>
#include <cstring>
#include <filesystem>
#include <optional>
#include <stdexcept>
#include <type_traits>

namespace starcensus::photometry {

namespace {

static_assert(std::is_trivially_copyable_v<CatalogRow>, "candidate rows are sent as their bytes");
static_assert(std::is_trivially_copyable_v<ScanCounts>, "counts are sent as their bytes");

/// One part of the scan: the rows `share` selects of file `file`.
struct ScanUnit {
    std::size_t file = 0;
    detail::RowShare share;
    std::uintmax_t bytes = 0; // its share of the file's size, for dealing out
    int rank = 0;             // the process that scans it
};

bool compressedBySuffix(const std::string& path) {
    return detail::endsWithAnyIgnoringCase(path, {".gz", ".bz2", ".z", ".zip"});
}

/// The parts and who scans them. Files are dealt out whole, largest first, each to the rank with the
/// fewest bytes so far (ties: the lowest rank); an uncompressed FITS file larger than an even share of
/// all the bytes is cut into that many row ranges first (a gzip stream cannot be entered in the middle).
std::vector<ScanUnit> planUnits(const std::vector<std::string>& paths, int ranks) {
    std::vector<std::uintmax_t> sizes(paths.size(), 0);
    std::uintmax_t total = 0;
    for (std::size_t i = 0; i < paths.size(); ++i) {
        std::error_code error;
        const std::uintmax_t size = std::filesystem::file_size(paths[i], error);
        sizes[i] = error ? 0 : size; // an unreadable file fails in its reader, with its message
        total += sizes[i];
    }
    const std::uintmax_t even_share = std::max<std::uintmax_t>(1, total / static_cast<std::uintmax_t>(ranks));
    std::vector<ScanUnit> units;
    for (std::size_t i = 0; i < paths.size(); ++i) {
        const bool splittable =
            !isCsvPath(paths[i]) && !isVoTablePath(paths[i]) && !compressedBySuffix(paths[i]);
        const auto parts = static_cast<unsigned>(
            splittable ? std::min<std::uintmax_t>(static_cast<std::uintmax_t>(ranks),
                                                  (sizes[i] + even_share - 1) / even_share)
                       : 1);
        for (unsigned part = 0; part < std::max(1U, parts); ++part) {
            units.push_back({i, {part, std::max(1U, parts)}, sizes[i] / std::max(1U, parts), 0});
        }
    }
    std::vector<std::size_t> order(units.size());
    for (std::size_t i = 0; i < order.size(); ++i) {
        order[i] = i;
    }
    std::stable_sort(order.begin(), order.end(),
                     [&](std::size_t a, std::size_t b) { return units[a].bytes > units[b].bytes; });
    std::vector<std::uintmax_t> load(static_cast<std::size_t>(ranks), 0);
    for (const std::size_t unit : order) {
        const auto least =
            static_cast<std::size_t>(std::min_element(load.begin(), load.end()) - load.begin());
        units[unit].rank = static_cast<int>(least);
        load[least] += units[unit].bytes;
    }
    return units;
}

// ---- Bytes of a scan part --------------------------------------------------------------------------

class Packer {
  public:
    template <class T>
    void value(const T& v) {
        static_assert(std::is_trivially_copyable_v<T>);
        bytes_.append(reinterpret_cast<const char*>(&v), sizeof v);
    }
    void text(const std::string& s) {
        value(static_cast<std::uint64_t>(s.size()));
        bytes_.append(s);
    }
    template <class T>
    void array(const std::vector<T>& items) {
        static_assert(std::is_trivially_copyable_v<T>);
        value(static_cast<std::uint64_t>(items.size()));
        bytes_.append(reinterpret_cast<const char*>(items.data()), items.size() * sizeof(T));
    }
    std::string& bytes() { return bytes_; }

  private:
    std::string bytes_;
};

class Unpacker {
  public:
    explicit Unpacker(const std::string& bytes) : bytes_(bytes) {}
    template <class T>
    T value() {
        T v{};
        take(&v, sizeof v);
        return v;
    }
    std::string text() {
        std::string s(value<std::uint64_t>(), '\0');
        take(s.data(), s.size());
        return s;
    }
    template <class T>
    std::vector<T> array() {
        std::vector<T> items(value<std::uint64_t>());
        take(items.data(), items.size() * sizeof(T));
        return items;
    }
    bool done() const { return at_ == bytes_.size(); }

  private:
    void take(void* out, std::size_t count) {
        if (count > bytes_.size() - at_) {
            throw std::runtime_error("scan part from another process is truncated");
        }
        std::memcpy(out, bytes_.data() + at_, count);
        at_ += count;
    }
    const std::string& bytes_;
    std::size_t at_ = 0;
};

enum class PartStatus : std::uint8_t { Scanned, InputFailure, InternalFailure };

void packResult(Packer& out, const detail::FileScanResult& result) {
    const FileScanReport& report = result.report;
    out.text(report.path);
    out.value(report.hdu_index);
    out.text(report.hdu_name);
    out.value(report.rows);
    for (const auto& resolved : report.mapping.fields) {
        out.value(static_cast<std::uint8_t>(resolved.has_value()));
        if (resolved) {
            out.value(resolved->field);
            out.value(resolved->route);
            out.value(resolved->column_index);
            out.text(resolved->column_name);
            out.text(resolved->matched_by);
            out.text(resolved->unit);
            out.text(resolved->unit_source);
            out.value(resolved->scale_to_canonical);
            out.value(resolved->flux_over_error);
        }
    }
    out.value(report.null_counts);
    out.value(report.null_counts_over_all_rows);
    out.value(report.parallax_min_mas);
    out.value(report.parallax_max_mas);
    out.value(report.counts);
    out.value(static_cast<std::uint64_t>(report.warnings.size()));
    for (const auto& warning : report.warnings) {
        out.text(warning);
    }
    out.text(result.where);
    out.array(result.candidates);
}

detail::FileScanResult unpackResult(Unpacker& in) {
    detail::FileScanResult result;
    FileScanReport& report = result.report;
    report.path = in.text();
    report.hdu_index = in.value<int>();
    report.hdu_name = in.text();
    report.rows = in.value<std::int64_t>();
    for (auto& resolved : report.mapping.fields) {
        if (in.value<std::uint8_t>() == 0) {
            continue;
        }
        ResolvedColumn column;
        column.field = in.value<CatalogField>();
        column.route = in.value<MappingRoute>();
        column.column_index = in.value<std::size_t>();
        column.column_name = in.text();
        column.matched_by = in.text();
        column.unit = in.text();
        column.unit_source = in.text();
        column.scale_to_canonical = in.value<double>();
        column.flux_over_error = in.value<bool>();
        resolved = std::move(column);
    }
    report.null_counts = in.value<decltype(report.null_counts)>();
    report.null_counts_over_all_rows = in.value<bool>();
    report.parallax_min_mas = in.value<double>();
    report.parallax_max_mas = in.value<double>();
    report.counts = in.value<ScanCounts>();
    report.warnings.resize(in.value<std::uint64_t>());
    for (auto& warning : report.warnings) {
        warning = in.text();
    }
    result.where = in.text();
    result.candidates = in.array<CatalogRow>();
    return result;
}

/// What one part gave: a result, or the error its reader threw.
struct PartOutcome {
    PartStatus status = PartStatus::Scanned;
    std::string message;
    detail::FileScanResult result;
};

} // namespace

CatalogScan scanCatalogsAcross(ProcessGroup& group, const std::vector<std::string>& paths,
                               const ScanSettings& settings) {
    if (group.size() == 1) {
        return scanCatalogs(paths, settings);
    }
    detail::requireInputFileCount(paths.size());
    const std::vector<ScanUnit> units = planUnits(paths, group.size());
    std::vector<std::size_t> mine;
    for (std::size_t u = 0; u < units.size(); ++u) {
        if (units[u].rank == group.rank()) {
            mine.push_back(u);
        }
    }
    // This rank's parts, several at once as scanCatalogs scans files; an error is kept for rank 0, which
    // reports the one scanCatalogs would (the first failing file's), not thrown here.
    const unsigned threads = detail::scanThreads(settings);
    const unsigned part_threads =
        std::max(1U, std::min<unsigned>(threads, static_cast<unsigned>(mine.size())));
    std::vector<PartOutcome> outcomes(mine.size());
    forEachIndex(mine.size(), part_threads, [&](std::size_t k) {
        const ScanUnit& unit = units[mine[k]];
        try {
            outcomes[k].result = detail::scanFile(paths[unit.file], static_cast<FileIndex>(unit.file),
                                                  settings, std::max(1U, threads / part_threads), unit.share);
        } catch (const InputError& error) {
            outcomes[k] = {PartStatus::InputFailure, error.what(), {}};
        } catch (const std::exception& error) {
            outcomes[k] = {PartStatus::InternalFailure, error.what(), {}};
        }
    });
    Packer packer;
    for (std::size_t k = 0; k < mine.size(); ++k) {
        packer.value(static_cast<std::uint64_t>(mine[k]));
        packer.value(outcomes[k].status);
        if (outcomes[k].status == PartStatus::Scanned) {
            packResult(packer, outcomes[k].result);
        } else {
            packer.text(outcomes[k].message);
        }
    }
    outcomes.clear();
    std::vector<std::string> received = group.gatherToRoot(packer.bytes());
    std::string().swap(packer.bytes());
    if (group.rank() != 0) {
        return {};
    }

    std::vector<PartOutcome> by_unit(units.size());
    for (std::string& bytes : received) {
        Unpacker in(bytes);
        while (!in.done()) {
            PartOutcome& outcome = by_unit.at(in.value<std::uint64_t>());
            outcome.status = in.value<PartStatus>();
            if (outcome.status == PartStatus::Scanned) {
                outcome.result = unpackResult(in);
            } else {
                outcome.message = in.text();
            }
        }
        std::string().swap(bytes); // rank 0 then holds the rows and at most one rank's bytes at a time
    }
    // Units are planned file by file, parts in row order: put each file back together.
    std::vector<detail::FileScanResult> files(paths.size());
    for (std::size_t u = 0; u < units.size(); ++u) {
        PartOutcome& outcome = by_unit[u];
        if (outcome.status == PartStatus::InputFailure) {
            throw InputError(outcome.message);
        }
        if (outcome.status == PartStatus::InternalFailure) {
            throw std::runtime_error(outcome.message);
        }
        const ScanUnit& unit = units[u];
        if (unit.share.part == 0) {
            files[unit.file] = std::move(outcome.result);
        } else {
            detail::appendPart(files[unit.file], std::move(outcome.result));
        }
        if (unit.share.parts > 1 && unit.share.part + 1 == unit.share.parts) {
            detail::ScanAccumulator(files[unit.file], settings).finish(files[unit.file].where);
        }
    }
    return detail::assembleScan(std::move(files));
}

} // namespace starcensus::photometry
