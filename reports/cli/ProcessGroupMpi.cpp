// The ProcessGroup of an MPI job (Open MPI from Debian; any MPI-3 library should do): compiled into the
// executable only with -DSTARCENSUS_MPI=ON. MPI is initialised only when an MPI launcher started this
// process (its environment says so), so a plain `starcensus run` never loads the MPI runtime's
// networking; MPI_Finalize runs when the group is destroyed at the end of main.
#include "photometry/base/ProcessGroup.h"

#include <mpi.h>

#include <algorithm>
#include <array>
#include <cstdint>
#include <cstdlib>

namespace starcensus {

namespace {

/// Launched by mpirun/mpiexec (Open MPI sets OMPI_COMM_WORLD_SIZE; PMI-based launchers, as MPICH's
/// Hydra and Slurm's srun, set PMI_SIZE or PMIX_RANK).
bool startedByMpiLauncher() {
    return std::getenv("OMPI_COMM_WORLD_SIZE") != nullptr || std::getenv("PMI_SIZE") != nullptr ||
           std::getenv("PMIX_RANK") != nullptr;
}

class MpiProcessGroup final : public ProcessGroup {
  public:
    MpiProcessGroup(int& argc, char**& argv) {
        MPI_Init(&argc, &argv);
        MPI_Comm_rank(MPI_COMM_WORLD, &rank_);
        MPI_Comm_size(MPI_COMM_WORLD, &size_);
    }
    ~MpiProcessGroup() override { MPI_Finalize(); }
    MpiProcessGroup(const MpiProcessGroup&) = delete;
    MpiProcessGroup& operator=(const MpiProcessGroup&) = delete;

    int rank() const override { return rank_; }
    int size() const override { return size_; }
    bool gathered() const override { return gathered_; }

    std::vector<std::string> gatherToRoot(const std::string& bytes) override {
        return gather(bytes, kShare, 0);
    }
    void gatherFailure(int exit_status, const std::string& printed) override {
        gather(printed, kFailure, exit_status);
    }

  private:
    static constexpr std::uint64_t kShare = 0;
    static constexpr std::uint64_t kFailure = 1;

    // (size, kind, exit status) of every rank first, then each rank's bytes in messages of at most 1 GiB
    // (MPI counts are int). Rank 0 receives everything before it reports a failure, so that every send
    // completes.
    std::vector<std::string> gather(const std::string& bytes, std::uint64_t kind, int exit_status) {
        constexpr std::size_t kChunk = std::size_t{1} << 30;
        gathered_ = true;
        const std::array<std::uint64_t, 3> header = {bytes.size(), kind,
                                                     static_cast<std::uint64_t>(exit_status)};
        std::vector<std::uint64_t> headers(rank_ == 0 ? 3 * static_cast<std::size_t>(size_) : 0);
        MPI_Gather(header.data(), 3, MPI_UINT64_T, headers.data(), 3, MPI_UINT64_T, 0, MPI_COMM_WORLD);
        if (rank_ != 0) {
            for (std::size_t at = 0; at < bytes.size(); at += kChunk) {
                MPI_Send(bytes.data() + at, static_cast<int>(std::min(kChunk, bytes.size() - at)), MPI_CHAR,
                         0, 0, MPI_COMM_WORLD);
            }
            return {};
        }
        std::vector<std::string> received(static_cast<std::size_t>(size_));
        received[0] = bytes;
        for (int source = 1; source < size_; ++source) {
            std::string& into = received[static_cast<std::size_t>(source)];
            into.resize(headers[3 * static_cast<std::size_t>(source)]);
            for (std::size_t at = 0; at < into.size(); at += kChunk) {
                MPI_Recv(into.data() + at, static_cast<int>(std::min(kChunk, into.size() - at)), MPI_CHAR,
                         source, 0, MPI_COMM_WORLD, MPI_STATUS_IGNORE);
            }
        }
        for (std::size_t source = 0; source < received.size(); ++source) {
            if (headers[3 * source + 1] == kFailure) {
                throw ProcessGroupFailure(static_cast<int>(headers[3 * source + 2]), received[source]);
            }
        }
        return received;
    }

    int rank_ = 0;
    int size_ = 1;
    bool gathered_ = false;
};

} // namespace

std::unique_ptr<ProcessGroup> joinProcessGroup(int& argc, char**& argv) {
    if (!startedByMpiLauncher()) {
        return singleProcessGroup();
    }
    return std::make_unique<MpiProcessGroup>(argc, argv);
}

} // namespace starcensus
