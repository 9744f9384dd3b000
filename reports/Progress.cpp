#include "reports/Progress.h"

#include <iomanip>
#include <ostream>

namespace starcensus::reports {

StageProgress::StageProgress(std::ostream& out, bool enabled, int stage_count)
    : out_(out), enabled_(enabled), stage_count_(stage_count) {}

void StageProgress::begin(const std::string& stage) {
    end();
    ++stage_;
    open_ = true;
    start_ = std::chrono::steady_clock::now();
    if (enabled_) {
        out_ << "starcensus: [" << stage_ << '/' << stage_count_ << "] " << stage << " ..." << std::flush;
    }
}

void StageProgress::end() {
    if (!open_) {
        return;
    }
    open_ = false;
    if (enabled_) {
        const double seconds =
            std::chrono::duration<double>(std::chrono::steady_clock::now() - start_).count();
        out_ << ' ' << std::fixed << std::setprecision(1) << seconds << " s\n" << std::flush;
    }
}

} // namespace starcensus::reports
