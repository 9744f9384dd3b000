#pragma once
// Command-line options of the catalog reader (Boost.Program_options), for every command that reads
// catalogs. The caller adds them to its own options and sets ScanSettings::min_parallax_mas itself.
#include "photometry/catalog/CatalogScan.h"

#include <boost/program_options.hpp>

namespace starcensus::photometry {

/// --column NAME=COLUMN (repeatable), --unit NAME=UNIT (repeatable), --hdu, --candidate-sigma, --threads,
/// --read-block-mb; with defaults, units and allowed ranges in the help text.
boost::program_options::options_description catalogReaderOptions();

/// The settings those options ask for. Throws InputError naming the option and the value for a malformed
/// NAME=VALUE, an unknown field, a unit the field does not accept, a field given twice, or a number
/// outside its allowed range.
ScanSettings scanSettingsFromOptions(const boost::program_options::variables_map& options);

} // namespace starcensus::photometry
