// The ProcessGroup of an MPI job (Open MPI from Debian; any MPI-3 library should do): compiled into the
// executable only with -DSTARCENSUS_MPI=ON. MPI is initialised only when an MPI launcher started this
// process (its environment says so), so a plain `starcensus run` never loads the MPI runtime's
// networking; MPI_Finalize runs when the group is destroyed at the end of main.
#include "photometry/base/ProcessGroup.h"

#include <mpi.h>

#include <algorithm>
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

    // Sizes first (64-bit), then each rank's bytes in messages of at most 1 GiB (MPI counts are int).
    std::vector<std::string> gatherToRoot(const std::string& bytes) override {
        constexpr std::size_t kChunk = std::size_t{1} << 30;
        auto size = static_cast<std::uint64_t>(bytes.size());
        std::vector<std::uint64_t> sizes(rank_ == 0 ? static_cast<std::size_t>(size_) : 0);
        MPI_Gather(&size, 1, MPI_UINT64_T, sizes.data(), 1, MPI_UINT64_T, 0, MPI_COMM_WORLD);
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
            into.resize(sizes[static_cast<std::size_t>(source)]);
            for (std::size_t at = 0; at < into.size(); at += kChunk) {
                MPI_Recv(into.data() + at, static_cast<int>(std::min(kChunk, into.size() - at)), MPI_CHAR,
                         source, 0, MPI_COMM_WORLD, MPI_STATUS_IGNORE);
            }
        }
        return received;
    }

    [[noreturn]] void abortAll(int status) override {
        MPI_Abort(MPI_COMM_WORLD, status);
        std::exit(status); // MPI_Abort does not return; this satisfies [[noreturn]]
    }

  private:
    int rank_ = 0;
    int size_ = 1;
};

} // namespace

std::unique_ptr<ProcessGroup> joinProcessGroup(int& argc, char**& argv) {
    if (!startedByMpiLauncher()) {
        return singleProcessGroup();
    }
    return std::make_unique<MpiProcessGroup>(argc, argv);
}

} // namespace starcensus
