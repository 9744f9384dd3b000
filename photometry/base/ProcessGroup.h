#pragma once
// The processes one run is spread over: one (the default), or the ranks of an MPI job started with
// `mpirun -n N starcensus run ...`. The scan is the only stage that uses more than one process
// (scanCatalogsAcross, CatalogScan.h); the rest of a run happens on rank 0. The MPI implementation is
// reports/cli/ProcessGroupMpi.cpp, compiled only with -DSTARCENSUS_MPI=ON; nothing else sees MPI.
#include <memory>
#include <string>
#include <vector>

namespace starcensus {

class ProcessGroup {
  public:
    virtual ~ProcessGroup() = default;
    virtual int rank() const = 0; // 0 is the process that computes and writes everything after the scan
    virtual int size() const = 0;
    /// Collective: every rank passes its bytes; rank 0 receives them all in rank order (its own first),
    /// the other ranks an empty list.
    virtual std::vector<std::string> gatherToRoot(const std::string& bytes) = 0;
    /// Ends every process of the group with `status` at once, so that no rank waits for a failed one.
    [[noreturn]] virtual void abortAll(int status) = 0;
};

/// A group of this process alone: rank 0 of 1.
std::unique_ptr<ProcessGroup> singleProcessGroup();

/// The group this process was started in: the MPI job's ranks when built with MPI and started by an MPI
/// launcher, else singleProcessGroup(). Called once, at the start of main.
std::unique_ptr<ProcessGroup> joinProcessGroup(int& argc, char**& argv);

} // namespace starcensus
