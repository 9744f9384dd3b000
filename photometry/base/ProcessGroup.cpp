#include "photometry/base/ProcessGroup.h"

#include <cstdlib>

namespace starcensus {

namespace {

class SingleProcess final : public ProcessGroup {
  public:
    int rank() const override { return 0; }
    int size() const override { return 1; }
    std::vector<std::string> gatherToRoot(const std::string& bytes) override { return {bytes}; }
    [[noreturn]] void abortAll(int status) override { std::exit(status); }
};

} // namespace

std::unique_ptr<ProcessGroup> singleProcessGroup() {
    return std::make_unique<SingleProcess>();
}

} // namespace starcensus
