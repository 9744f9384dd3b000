#include "photometry/base/Progress.h"

#include <unistd.h>

#include <condition_variable>
#include <cstdio>
#include <mutex>

namespace starcensus {

bool stderrIsTerminal() {
    return ::isatty(STDERR_FILENO) == 1;
}

TerminalProgress::TerminalProgress(std::string label, std::string item_name, const ProgressCounters& counters,
                                   bool enabled, std::chrono::milliseconds interval)
    : label_(std::move(label)), item_name_(std::move(item_name)), counters_(counters) {
    if (!enabled) {
        return;
    }
    poller_ = std::jthread([this, interval](std::stop_token stop) {
        std::mutex mutex;
        std::condition_variable_any wake;
        std::unique_lock lock(mutex);
        // Sleeps `interval` unless a stop is requested, which wakes it at once.
        while (!wake.wait_for(lock, stop, interval, [] { return false; }) && !stop.stop_requested()) {
            draw();
        }
    });
}

TerminalProgress::~TerminalProgress() {
    if (poller_.joinable()) {
        poller_.request_stop();
        poller_.join();
        std::fputs("\r\033[K", stderr); // erase the line (ANSI "erase in line")
    }
}

void TerminalProgress::draw() const {
    const double done = static_cast<double>(counters_.items_done.load(std::memory_order_relaxed));
    const double total = static_cast<double>(counters_.items_total.load(std::memory_order_relaxed));
    const int parts_total = counters_.parts_total.load(std::memory_order_relaxed);
    std::string line = "\r\033[K" + label_ + ": ";
    char number[96];
    if (total > 0.0) {
        std::snprintf(number, sizeof number, "%.1f of %.1f M %s (%.0f%%)", done / 1e6, total / 1e6,
                      item_name_.c_str(), 100.0 * done / total);
    } else {
        std::snprintf(number, sizeof number, "%.1f M %s", done / 1e6, item_name_.c_str());
    }
    line += number;
    if (parts_total > 0) {
        line += ", files " + std::to_string(counters_.parts_done.load(std::memory_order_relaxed)) + "/" +
                std::to_string(parts_total);
    }
    std::fputs(line.c_str(), stderr);
    std::fflush(stderr);
}

} // namespace starcensus
