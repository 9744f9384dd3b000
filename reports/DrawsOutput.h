#pragma once
// draws.fits and draws.csv: the Monte Carlo draws themselves, for tools that marginalise over them. One
// row per radius and draw (radius-major): radius_pc, draw, members, then n_<group> (member count) and
// f_<group> (count / members) for every class and group; group names are reduced to [A-Za-z0-9_].
#include "census/ClassGroups.h"
#include "census/MonteCarlo.h"

#include <filesystem>
#include <string>
#include <vector>

namespace starcensus::reports {

/// The column names of both files, in order.
std::vector<std::string> drawColumnNames(const std::vector<census::ClassGroup>& groups);

void writeDrawsTable(const std::filesystem::path& path, const census::DrawTallies& tallies,
                     const std::vector<double>& radii_pc, const std::vector<census::ClassGroup>& groups);

std::string drawsCsv(const census::DrawTallies& tallies, const std::vector<double>& radii_pc,
                     const std::vector<census::ClassGroup>& groups);

} // namespace starcensus::reports
