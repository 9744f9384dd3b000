#pragma once
// A file's bytes, plain, gzip- or bzip2-compressed (zlib reads plain and gzip; libbz2 the files that
// start with bzip2's "BZh" magic, also several streams one after another as pbzip2 writes them), in
// blocks inflated ahead by a thread of its own: the reader that parses the text and the inflate run at
// once, so a compressed scan takes about as long as the slower of the two instead of their sum (README,
// Performance). Memory is bounded: a few blocks per open file, never the whole stream.
#include <condition_variable>
#include <cstddef>
#include <deque>
#include <memory>
#include <mutex>
#include <string>
#include <string_view>
#include <thread>
#include <vector>

namespace starcensus::photometry::detail {

class BlockDecoder; // gzip/plain or bzip2 (InflatedBlocks.cpp)

class InflatedBlocks {
  public:
    static constexpr std::size_t kBlockBytes = std::size_t{1} << 20; // inflated bytes per block (1 MiB)
    static constexpr std::size_t kBlocksAhead = 4;                   // blocks inflated ahead of the reader

    /// Opens `path` (throws InputError naming it if it cannot) and starts inflating.
    explicit InflatedBlocks(const std::string& path);
    ~InflatedBlocks(); // stops the inflate thread, also when the reader stopped early
    InflatedBlocks(const InflatedBlocks&) = delete;
    InflatedBlocks& operator=(const InflatedBlocks&) = delete;

    /// The next block (valid until the next call); empty at the end of the stream. An empty block with
    /// failed() true: the stream was damaged or truncated after the bytes already given.
    std::string_view next();
    bool failed() const { return !failure_.empty(); }
    /// The decompressor's description of the damage ("" if none).
    const std::string& failure() const { return failure_; }

  private:
    void inflateAll();

    std::unique_ptr<BlockDecoder> decoder_;
    std::mutex mutex_;
    std::condition_variable changed_;
    std::vector<std::vector<char>> buffers_;
    std::deque<std::size_t> free_;                          // buffers the inflate thread may fill
    std::deque<std::pair<std::size_t, std::size_t>> ready_; // (buffer, bytes) for the reader, in order
    std::size_t in_reader_ = kBlocksAhead;                  // the buffer the reader holds; kBlocksAhead: none
    bool finished_ = false;                                 // the inflate thread queued its last block
    bool stopping_ = false;                                 // the reader is gone
    std::string failure_;                                   // set before finished_
    std::thread inflater_;
};

} // namespace starcensus::photometry::detail
