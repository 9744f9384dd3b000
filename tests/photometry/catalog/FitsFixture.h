#pragma once
// Test helpers: a temporary directory, and tiny FITS binary tables written with cfitsio with chosen
// columns, TFORMs, TUNITs, TUCDs, TNULLs and TSCAL/TZERO, so reader tests run on files made for them.
#include <cstdint>
#include <filesystem>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "tests/support/ReferencePython.h"

namespace starcensus::testing {

/// One column. Exactly one of values, integers, texts is filled (one entry per row).
struct FixtureColumn {
    std::string name;
    std::string tform; // cfitsio codes, including "1W" (unsigned 64-bit: K with TZERO = 2^63)
    std::string unit;
    std::string ucd;
    std::optional<long long> tnull;
    std::optional<double> tscal;
    std::optional<double> tzero;
    std::vector<double> values; // NaN is written as a null (TNULL for integers, NaN for floats);
                                // for TFORM L, 0 is false and anything else true
    std::vector<std::optional<std::int64_t>> integers; // exact 64-bit values; nullopt is TNULL
    std::vector<std::string> texts;                    // for TFORM nA

    std::size_t rows() const;
};

/// A column with no data yet; fill one of its value lists.
FixtureColumn makeColumn(std::string name, std::string tform, std::string unit = "", std::string ucd = "");

/// A column of floating-point values (NaN = null).
FixtureColumn valueColumn(std::string name, std::string tform, std::string unit, std::vector<double> values,
                          std::string ucd = "");

struct FixtureTable {
    std::string extname;
    std::vector<FixtureColumn> columns;
};

/// A Gaia-like table (EXTNAME MIXED) of every supported TFORM (B, I, J, K, E, D, and unsigned 32- and
/// 64-bit through TZERO), scaled and TNULL-bearing columns, unmapped text, logical and vector columns in
/// between, and rows with missing, negative and zero-error parallaxes; reproducible from `seed`.
/// Parallaxes are in arcsec (UCD-mapped), declinations in rad, pmra in arcsec/yr.
FixtureTable mixedTypeTable(std::size_t rows, std::uint64_t seed);

/// Writes a FITS file: an empty primary HDU, then one binary table per entry (overwrites `path`).
void writeFitsTables(const std::string& path, const std::vector<FixtureTable>& tables);
/// Convenience for a single table.
void writeFitsTable(const std::string& path, const FixtureTable& table);

/// Gzip-compresses `source` into `target` with zlib.
void gzipFile(const std::string& source, const std::string& target);

/// The message of the InputError `action` throws, or "no error".
std::string inputErrorOf(const std::function<void()>& action);

/// Writes text to a file (CSV fixtures, path lists).
void writeText(const std::string& path, const std::string& text);

} // namespace starcensus::testing
