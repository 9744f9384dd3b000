#pragma once
// Progress of long computations (the catalog scan, the Monte Carlo): the computation advances relaxed
// atomic counters, never locking or printing; whoever wants a display polls them from another thread.
// TerminalProgress is that display for the command line: one self-overwriting line on stderr, shown only
// when asked for (the command line asks when stderr is a terminal, isatty(2)), so logs and pipes stay clean.
#include <atomic>
#include <chrono>
#include <cstdint>
#include <string>
#include <thread>

namespace starcensus {

/// Counters advanced by a computation. Units depend on the computation:
///  - scanCatalogs: items = table rows read (items_total grows as each file's header is read),
///    parts = input files finished (parts_total = number of files);
///  - census::drawSample: items = star-draws done (stars x draws; items_total set at the start),
///    parts unused.
struct ProgressCounters {
    std::atomic<std::int64_t> items_done{0};
    std::atomic<std::int64_t> items_total{0}; // 0: not known yet
    std::atomic<int> parts_done{0};
    std::atomic<int> parts_total{0};
};

/// True if standard error is a terminal (isatty(2)).
bool stderrIsTerminal();

/// While alive and enabled, redraws "label: 3.2 of 10.0 M rows (31%), files 1/4" on stderr every
/// `interval`; disabled, it does nothing. The line is erased on destruction.
class TerminalProgress {
  public:
    TerminalProgress(std::string label, std::string item_name, const ProgressCounters& counters, bool enabled,
                     std::chrono::milliseconds interval = std::chrono::milliseconds(250));
    ~TerminalProgress();
    TerminalProgress(const TerminalProgress&) = delete;
    TerminalProgress& operator=(const TerminalProgress&) = delete;

  private:
    void draw() const;

    std::string label_;
    std::string item_name_;
    const ProgressCounters& counters_;
    std::jthread poller_;
};

} // namespace starcensus
