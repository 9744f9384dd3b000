#pragma once
// Candidate columns for a logical field the mapping left unmapped, for `inspect` to suggest (never to
// apply): each column gets a score from three kinds of evidence, each part printed as its reason.
//
//   UCD   +50  the column's UCD is one the mapping recognises for the field (then it is mapped unless
//              two columns share it);
//         +25  it names the same quantity (pos.parallax, em.IR.J, ...) and agrees on stat.error;
//   unit  +20  TUNITn is a unit the field accepts; +10 when the unit is only implied by the name
//              ("plx_mas", "G_mag"); -50 for a stated unit the field does not accept;
//   name  +40  the name is one the mapping recognises; else +30 when a name token is the field's stem
//              (case-insensitive tokens split at '_', '-', '.', blanks; "mag"/"mpro" suffixes and error
//              markers "e_", "e", "err", "error", "sig", "sigma", "unc", "msigcom", "sigmpro" removed
//              first: "eG_mag", "Gerr_DR2", "plxerr", "W1sigmpro");
//         +10  a release token of the field's survey (gaia, dr2, dr3, edr3; 2mass; wise, allwise,
//              catwise); -10 for another survey's (P1, PS1, SDSS, MKO, UKIDSS, UKIRT, VHS, VISTA);
//         -25  a stem of another band in the same name ("G_BP_DR2" for g);
//   cells -10  CSV cells that are not numbers ("-", "null"), which a run refuses; -30 when every cell
//              is null.
// A column is no candidate when its kind does not fit (text for a numeric field, numbers for
// spectral_type, vectors), when an error field's name has no error marker or a value field's name has
// one, when a token marks a reference, flag, count, distance or absolute magnitude ("ref_J_2MASS",
// "dist_J_2MASS_formula", "MG_mag"), or when its score is not positive.
#include "photometry/catalog/ColumnProfile.h"

#include <cstddef>
#include <string>
#include <vector>

namespace starcensus::photometry {

struct ColumnCandidate {
    std::size_t column_index = 0; // into TableProfile::columns
    int score = 0;
    std::string reasons;   // "name token plx +30, unit mas (name) +10"
    std::string name_unit; // unit implied by the name ("mas" for plx_mas), "" if none
};

/// The candidates for `field` among `columns`, best first (ties in table order), at most `limit`.
std::vector<ColumnCandidate> rankCandidates(CatalogField field, const std::vector<ColumnProfile>& columns,
                                            std::size_t limit = 3);

} // namespace starcensus::photometry
