#pragma once
// Progress of long work, one line per stage on a terminal ("starcensus: [2/4] posteriors ... 1.3 s");
// silent when disabled, so logs and pipes stay clean.
#include <chrono>
#include <iosfwd>
#include <string>

namespace starcensus::reports {

class StageProgress {
  public:
    StageProgress(std::ostream& out, bool enabled, int stage_count);
    /// Ends the previous stage, if any, and announces the next one.
    void begin(const std::string& stage);
    /// Ends the current stage: prints its elapsed time.
    void end();

  private:
    std::ostream& out_;
    bool enabled_;
    int stage_count_;
    int stage_ = 0;
    bool open_ = false;
    std::chrono::steady_clock::time_point start_;
};

} // namespace starcensus::reports
