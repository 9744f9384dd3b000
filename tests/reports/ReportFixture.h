#pragma once
// A small census run for the report tests: a simulated 12 pc neighbourhood (known truth), the census at
// 5 and 10 pc with 200 draws, written once per test binary into a scratch directory.
#include "tests/support/ReferencePython.h"

#include <filesystem>
#include <string>
#include <vector>

namespace starcensus::testing {

/// The directory of the run (sample.fits, fractions.json, ...); created on first use.
const std::filesystem::path& demoRunDirectory();

/// A copy of the run in a fresh directory named `name` (so a test can add or break files).
std::filesystem::path copyOfDemoRun(const ScratchDirectory& scratch, const std::string& name);

/// An RGB image decoded with libpng.
struct RgbImage {
    int width = 0;
    int height = 0;
    std::vector<unsigned char> pixels; // row-major RGB

    /// Share of pixels in the rectangle that differ from white by more than 24 in any channel.
    double inkFraction(int x0, int y0, int x1, int y1) const;
};

RgbImage readPng(const std::filesystem::path& path);

} // namespace starcensus::testing
