#pragma once
// Outputs are written under a temporary name beside the final one and renamed only when complete, so a
// failed run never leaves a half-written file behind.
#include <filesystem>
#include <string>

namespace starcensus {

class AtomicOutput {
  public:
    explicit AtomicOutput(std::filesystem::path final_path);
    ~AtomicOutput(); // removes the temporary file unless commit() succeeded
    AtomicOutput(const AtomicOutput&) = delete;
    AtomicOutput& operator=(const AtomicOutput&) = delete;

    /// Where to write (same directory as the final path, so the rename is atomic).
    const std::filesystem::path& temporaryPath() const { return temporary_; }
    const std::filesystem::path& finalPath() const { return final_; }
    /// Renames the temporary file onto the final path; throws InputError naming the path on failure.
    void commit();

  private:
    std::filesystem::path final_;
    std::filesystem::path temporary_;
    bool committed_ = false;
};

/// Writes text to `path` through an AtomicOutput.
void writeTextFileAtomically(const std::filesystem::path& path, const std::string& text);

} // namespace starcensus
