// joinProcessGroup of a build without MPI (-DSTARCENSUS_MPI=OFF): every run is one process.
#include "photometry/base/ProcessGroup.h"

namespace starcensus {

std::unique_ptr<ProcessGroup> joinProcessGroup(int&, char**&) {
    return singleProcessGroup();
}

} // namespace starcensus
