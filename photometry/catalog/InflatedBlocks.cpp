#include "photometry/catalog/InflatedBlocks.h"

#include "photometry/base/InputError.h"

#include <bzlib.h>
#include <zlib.h>

#include <array>
#include <cstdio>

namespace starcensus::photometry::detail {

/// Fills `out` with up to `size` decompressed bytes: the number given (0 at the end of the data), or -1
/// with `failure` set when the data are damaged or end inside a stream.
class BlockDecoder {
  public:
    virtual ~BlockDecoder() = default;
    virtual long read(char* out, std::size_t size, std::string& failure) = 0;
};

namespace {

constexpr std::size_t kCompressedReadBytes = std::size_t{1} << 18; // 256 KiB of input per read(2)

class GzipDecoder final : public BlockDecoder {
  public:
    explicit GzipDecoder(gzFile file) : file_(file) { gzbuffer(file_, kCompressedReadBytes); }
    ~GzipDecoder() override { gzclose(file_); }
    long read(char* out, std::size_t size, std::string& failure) override {
        const int got = gzread(file_, out, static_cast<unsigned>(size));
        int status = Z_OK;
        const char* message = gzerror(file_, &status);
        if (got < 0 || (status != Z_OK && status != Z_STREAM_END)) {
            failure = std::string("zlib: ") + message;
            return -1;
        }
        return got;
    }

  private:
    gzFile file_;
};

/// bzip2 with libbz2's stream interface, which (unlike BZ2_bzRead) lets the next stream of a
/// multi-stream file start on the input left after the previous one's end.
class Bzip2Decoder final : public BlockDecoder {
  public:
    explicit Bzip2Decoder(std::FILE* file) : file_(file) { BZ2_bzDecompressInit(&stream_, 0, 0); }
    ~Bzip2Decoder() override {
        BZ2_bzDecompressEnd(&stream_);
        std::fclose(file_);
    }
    long read(char* out, std::size_t size, std::string& failure) override {
        stream_.next_out = out;
        stream_.avail_out = static_cast<unsigned>(size);
        while (stream_.avail_out > 0 && !ended_ && damage_.empty()) {
            if (stream_.avail_in == 0) {
                const std::size_t got = std::fread(input_.data(), 1, input_.size(), file_);
                if (got == 0) {
                    if (std::ferror(file_) != 0 || !between_streams_) {
                        damage_ = std::ferror(file_) != 0 ? "bzip2: read error"
                                                          : "bzip2: the data end inside a stream";
                        break;
                    }
                    ended_ = true;
                    break;
                }
                stream_.next_in = input_.data();
                stream_.avail_in = static_cast<unsigned>(got);
            }
            between_streams_ = false;
            const int status = BZ2_bzDecompress(&stream_);
            if (status == BZ_STREAM_END) {
                // The next stream starts on the input after this one's end, into the room left in `out`:
                // ending and initialising a decompressor leave next_in/avail_in and next_out/avail_out as
                // they are.
                BZ2_bzDecompressEnd(&stream_);
                BZ2_bzDecompressInit(&stream_, 0, 0);
                between_streams_ = true;
                ++streams_ended_;
            } else if (status != BZ_OK) {
                damage_ =
                    status == BZ_DATA_ERROR_MAGIC && streams_ended_ > 0
                        ? "bzip2: not bzip2 data after the end of stream " + std::to_string(streams_ended_)
                        : "bzip2: damaged data (libbz2 status " + std::to_string(status) + ")";
            }
        }
        // The bytes before the damage first, so the reader can say after which line it lies; the damage
        // on the next call.
        const auto produced = static_cast<long>(size - stream_.avail_out);
        if (produced == 0 && !damage_.empty()) {
            failure = damage_;
            return -1;
        }
        return produced;
    }

  private:
    std::FILE* file_;
    bz_stream stream_{}; // zeroed: libbz2's own allocator
    std::array<char, kCompressedReadBytes> input_{};
    bool between_streams_ = true; // no stream started, or the last one ended: the data may end here
    bool ended_ = false;
    int streams_ended_ = 0;
    std::string damage_; // what ended the data early, reported once the bytes before it are given
};

std::unique_ptr<BlockDecoder> openDecoder(const std::string& path) {
    std::FILE* file = std::fopen(path.c_str(), "rb");
    if (file == nullptr) {
        throw InputError(path + ": no such file or not readable");
    }
    std::array<char, 3> magic{};
    const bool bzip2 = std::fread(magic.data(), 1, magic.size(), file) == magic.size() && magic[0] == 'B' &&
                       magic[1] == 'Z' && magic[2] == 'h';
    if (bzip2) {
        std::rewind(file);
        return std::make_unique<Bzip2Decoder>(file);
    }
    std::fclose(file);
    gzFile gz = gzopen(path.c_str(), "rb");
    if (gz == nullptr) {
        throw InputError(path + ": no such file or not readable");
    }
    return std::make_unique<GzipDecoder>(gz);
}

} // namespace

InflatedBlocks::InflatedBlocks(const std::string& path)
    : decoder_(openDecoder(path)), buffers_(kBlocksAhead) {
    for (std::size_t i = 0; i < kBlocksAhead; ++i) {
        buffers_[i].resize(kBlockBytes);
        free_.push_back(i);
    }
    inflater_ = std::thread([this] { inflateAll(); });
}

InflatedBlocks::~InflatedBlocks() {
    {
        const std::lock_guard lock(mutex_);
        stopping_ = true;
    }
    changed_.notify_all();
    inflater_.join();
}

void InflatedBlocks::inflateAll() {
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
            const long got = decoder_->read(out + filled, kBlockBytes - filled, failure);
            if (got < 0) {
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
    decoder_.reset(); // closes the file as soon as the stream is read
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
