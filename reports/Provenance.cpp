#include "reports/Provenance.h"

#include "photometry/InputError.h"

#include <boost/any.hpp>
#include <openssl/evp.h>

#include <array>
#include <cstdint>
#include <fstream>
#include <memory>
#include <stdexcept>

namespace starcensus::reports {

namespace {

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
        static constexpr char kDigits[] = "0123456789abcdef";
        std::string text;
        for (unsigned int i = 0; i < length; ++i) {
            text += kDigits[digest[i] >> 4];
            text += kDigits[digest[i] & 0xf];
        }
        return text;
    }

  private:
    std::unique_ptr<EVP_MD_CTX, decltype(&EVP_MD_CTX_free)> context_;
};

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
    Sha256 digest;
    digest.update(bytes.data(), bytes.size());
    return digest.hex();
}

std::string sha256File(const std::filesystem::path& path) {
    std::ifstream file(path, std::ios::binary);
    if (!file) {
        throw InputError("cannot read " + path.string() + " to checksum it");
    }
    Sha256 digest;
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

nlohmann::json inputFilesJson(const std::vector<std::string>& paths) {
    nlohmann::json files = nlohmann::json::array();
    for (const auto& path : paths) {
        files.push_back({{"path", std::filesystem::absolute(path).string()},
                         {"size_bytes", std::filesystem::file_size(path)},
                         {"sha256", sha256File(path)}});
    }
    return files;
}

} // namespace starcensus::reports
