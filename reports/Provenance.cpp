#include "reports/Provenance.h"

#include "photometry/base/InputError.h"

#include <boost/any.hpp>
#include <openssl/evp.h>
#include <xxhash.h>

#include <array>
#include <cstdint>
#include <fstream>
#include <memory>
#include <stdexcept>

namespace starcensus::reports {

namespace {

std::string hexDigits(const unsigned char* bytes, std::size_t length) {
    static constexpr char kDigits[] = "0123456789abcdef";
    std::string text;
    for (std::size_t i = 0; i < length; ++i) {
        text += kDigits[bytes[i] >> 4];
        text += kDigits[bytes[i] & 0xf];
    }
    return text;
}

/// An EVP SHA-256 context fed in pieces.
class Sha256 {
  public:
    Sha256() : context_(EVP_MD_CTX_new(), EVP_MD_CTX_free) {
        if (!context_ || EVP_DigestInit_ex(context_.get(), EVP_sha256(), nullptr) != 1) {
            throw std::runtime_error("OpenSSL: cannot start a SHA-256 digest");
        }
    }
    void update(const char* data, std::size_t size) {
        if (EVP_DigestUpdate(context_.get(), data, size) != 1) {
            throw std::runtime_error("OpenSSL: SHA-256 update failed");
        }
    }
    std::string hex() {
        std::array<unsigned char, EVP_MAX_MD_SIZE> digest{};
        unsigned int length = 0;
        if (EVP_DigestFinal_ex(context_.get(), digest.data(), &length) != 1) {
            throw std::runtime_error("OpenSSL: SHA-256 final failed");
        }
        return hexDigits(digest.data(), length);
    }

  private:
    std::unique_ptr<EVP_MD_CTX, decltype(&EVP_MD_CTX_free)> context_;
};

/// A streaming XXH3-128 state fed in pieces.
class Xxh128 {
  public:
    Xxh128() : state_(XXH3_createState(), XXH3_freeState) {
        if (!state_ || XXH3_128bits_reset(state_.get()) != XXH_OK) {
            throw std::runtime_error("xxHash: cannot start an XXH128 digest");
        }
    }
    void update(const char* data, std::size_t size) {
        if (XXH3_128bits_update(state_.get(), data, size) != XXH_OK) {
            throw std::runtime_error("xxHash: XXH128 update failed");
        }
    }
    std::string hex() {
        XXH128_canonical_t canonical;
        XXH128_canonicalFromHash(&canonical, XXH3_128bits_digest(state_.get()));
        return hexDigits(canonical.digest, sizeof canonical.digest);
    }

  private:
    std::unique_ptr<XXH3_state_t, decltype(&XXH3_freeState)> state_;
};

template <class Digest>
std::string digestString(const std::string& bytes) {
    Digest digest;
    digest.update(bytes.data(), bytes.size());
    return digest.hex();
}

/// The file's bytes, 1 MiB at a time, into digest.update(); InputError naming the file on failure.
template <class Digest>
std::string digestFile(const std::filesystem::path& path) {
    std::ifstream file(path, std::ios::binary);
    if (!file) {
        throw InputError("cannot read " + path.string() + " to checksum it");
    }
    Digest digest;
    std::vector<char> buffer(1 << 20);
    while (file) {
        file.read(buffer.data(), static_cast<std::streamsize>(buffer.size()));
        digest.update(buffer.data(), static_cast<std::size_t>(file.gcount()));
    }
    if (file.bad()) {
        throw InputError("error reading " + path.string() + " to checksum it");
    }
    return digest.hex();
}

template <class T>
bool tryJson(const boost::any& value, nlohmann::json& out) {
    if (const T* typed = boost::any_cast<T>(&value)) {
        out = *typed;
        return true;
    }
    return false;
}

nlohmann::json anyToJson(const boost::any& value) {
    nlohmann::json out;
    if (tryJson<std::string>(value, out) || tryJson<double>(value, out) || tryJson<int>(value, out) ||
        tryJson<unsigned>(value, out) || tryJson<std::int64_t>(value, out) ||
        tryJson<std::uint64_t>(value, out) || tryJson<bool>(value, out) || tryJson<float>(value, out) ||
        tryJson<std::vector<std::string>>(value, out)) {
        return out;
    }
    return "(unprintable)";
}

} // namespace

std::string sha256Hex(const std::string& bytes) {
    return digestString<Sha256>(bytes);
}

std::string xxh128Hex(const std::string& bytes) {
    return digestString<Xxh128>(bytes);
}

ChecksumAlgorithm checksumAlgorithmNamed(const std::string& name) {
    for (const ChecksumAlgorithm algorithm :
         {ChecksumAlgorithm::Xxh128, ChecksumAlgorithm::Sha256, ChecksumAlgorithm::None}) {
        if (name == checksumAlgorithmName(algorithm)) {
            return algorithm;
        }
    }
    throw InputError("--checksum: unknown algorithm '" + name + "' (xxh128, sha256 or none)");
}

std::string checksumAlgorithmName(ChecksumAlgorithm algorithm) {
    switch (algorithm) {
    case ChecksumAlgorithm::Xxh128:
        return "xxh128";
    case ChecksumAlgorithm::Sha256:
        return "sha256";
    case ChecksumAlgorithm::None:
        break;
    }
    return "none";
}

std::string fileChecksum(const std::filesystem::path& path, ChecksumAlgorithm algorithm) {
    switch (algorithm) {
    case ChecksumAlgorithm::Xxh128:
        return digestFile<Xxh128>(path);
    case ChecksumAlgorithm::Sha256:
        return digestFile<Sha256>(path);
    case ChecksumAlgorithm::None:
        break;
    }
    return {};
}

nlohmann::json optionValuesJson(const boost::program_options::variables_map& values) {
    nlohmann::json options = nlohmann::json::object();
    nlohmann::json given = nlohmann::json::array();
    for (const auto& [name, value] : values) {
        options[name] = anyToJson(value.value());
        if (!value.defaulted()) {
            given.push_back(name);
        }
    }
    return {{"options", options}, {"options_given", given}};
}

nlohmann::json inputFilesJson(const std::vector<std::string>& paths, ChecksumAlgorithm algorithm) {
    nlohmann::json files = nlohmann::json::array();
    for (const auto& path : paths) {
        nlohmann::json file = {{"path", std::filesystem::absolute(path).string()},
                               {"size_bytes", std::filesystem::file_size(path)}};
        if (algorithm != ChecksumAlgorithm::None) {
            file[checksumAlgorithmName(algorithm)] = fileChecksum(path, algorithm);
        }
        files.push_back(std::move(file));
    }
    return files;
}

} // namespace starcensus::reports
