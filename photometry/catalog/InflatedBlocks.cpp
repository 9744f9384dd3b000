#include "photometry/catalog/InflatedBlocks.h"

#include "photometry/base/InputError.h"

#include <zlib.h>

namespace starcensus::photometry::detail {

InflatedBlocks::InflatedBlocks(const std::string& path) : buffers_(kBlocksAhead) {
    gzFile file = gzopen(path.c_str(), "rb");
    if (file == nullptr) {
        throw InputError(path + ": no such file or not readable");
    }
    gzbuffer(file, 1u << 18); // 256 KiB of compressed input per read(2)
    for (std::size_t i = 0; i < kBlocksAhead; ++i) {
        buffers_[i].resize(kBlockBytes);
        free_.push_back(i);
    }
    inflater_ = std::thread([this, file] { inflateAll(file); });
}

InflatedBlocks::~InflatedBlocks() {
    {
        const std::lock_guard lock(mutex_);
        stopping_ = true;
    }
    changed_.notify_all();
    inflater_.join();
}

void InflatedBlocks::inflateAll(void* opaque) {
    const auto file = static_cast<gzFile>(opaque);
    std::string failure;
    for (bool end = false; !end;) {
        std::size_t buffer = 0;
        {
            std::unique_lock lock(mutex_);
            changed_.wait(lock, [&] { return stopping_ || !free_.empty(); });
            if (stopping_) {
                break;
            }
            buffer = free_.front();
            free_.pop_front();
        }
        // Filled outside the lock: this is the work that runs beside the reader.
        char* out = buffers_[buffer].data();
        std::size_t filled = 0;
        while (filled < kBlockBytes) {
            const int got = gzread(file, out + filled, static_cast<unsigned>(kBlockBytes - filled));
            int status = Z_OK;
            const char* message = gzerror(file, &status);
            if (got < 0 || (status != Z_OK && status != Z_STREAM_END)) {
                failure = std::string("zlib: ") + message;
                end = true;
                break;
            }
            if (got == 0) {
                end = true;
                break;
            }
            filled += static_cast<std::size_t>(got);
        }
        {
            const std::lock_guard lock(mutex_);
            if (filled > 0) {
                ready_.emplace_back(buffer, filled);
            } else {
                free_.push_back(buffer);
            }
            if (end) {
                failure_ = failure;
                finished_ = true;
            }
        }
        changed_.notify_all();
    }
    gzclose(file);
}

std::string_view InflatedBlocks::next() {
    std::unique_lock lock(mutex_);
    if (in_reader_ != kBlocksAhead) {
        free_.push_back(in_reader_); // the reader is done with the previous block
        in_reader_ = kBlocksAhead;
        changed_.notify_all();
    }
    changed_.wait(lock, [&] { return !ready_.empty() || finished_; });
    if (ready_.empty()) {
        return {};
    }
    const auto [buffer, bytes] = ready_.front();
    ready_.pop_front();
    in_reader_ = buffer;
    return {buffers_[buffer].data(), bytes};
}

} // namespace starcensus::photometry::detail
