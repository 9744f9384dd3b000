#pragma once
// The processes one run is spread over: one (the default), or the ranks of an MPI job started with
// `mpirun -n N starcensus run ...`. The scan is the only stage that uses more than one process
// (scanCatalogsAcross, CatalogScan.h) and its gather the only collective step: every rank takes part in
// it exactly once, with its share of the scan or, if it failed before, with its error, so that no rank
// waits for a failed one and rank 0 reports the error as one line. The MPI implementation is
// reports/cli/ProcessGroupMpi.cpp, compiled only with -DSTARCENSUS_MPI=ON; nothing else sees MPI.
#include <memory>
#include <stdexcept>
#include <string>
#include <vector>

namespace starcensus {

/// Thrown on rank 0 by gatherToRoot when a rank took part with its error: the error as that rank would
/// have printed it, and its exit status.
class ProcessGroupFailure : public std::runtime_error {
  public:
    ProcessGroupFailure(int exit_status, const std::string& printed)
        : std::runtime_error(printed), status(exit_status) {}
    int status;
};

class ProcessGroup {
  public:
    virtual ~ProcessGroup() = default;
    virtual int rank() const = 0; // 0 is the process that computes and writes everything after the scan
    virtual int size() const = 0;
    /// Collective: every rank passes its bytes; rank 0 receives them all in rank order (its own first),
    /// the other ranks an empty list. On rank 0, throws ProcessGroupFailure (the lowest failed rank's)
    /// when a rank took part through gatherFailure.
    virtual std::vector<std::string> gatherToRoot(const std::string& bytes) = 0;
    /// Takes part in the gather for a rank that failed before it: `printed` is its error line(s).
    virtual void gatherFailure(int exit_status, const std::string& printed) = 0;
    /// True once this rank took part in the gather.
    virtual bool gathered() const = 0;
};

/// A group of this process alone: rank 0 of 1.
std::unique_ptr<ProcessGroup> singleProcessGroup();

/// The group this process was started in: the MPI job's ranks when built with MPI and started by an MPI
/// launcher, else singleProcessGroup(). Called once, at the start of main.
std::unique_ptr<ProcessGroup> joinProcessGroup(int& argc, char**& argv);

} // namespace starcensus
