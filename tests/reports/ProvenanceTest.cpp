#include "reports/Provenance.h"
#include "photometry/base/InputError.h"
#include "reports/Progress.h"
#include "tests/support/ReferencePython.h"

#include <boost/program_options.hpp>
#include <doctest/doctest.h>

#include <fstream>
#include <sstream>

using namespace starcensus;

TEST_CASE("checksums match the published test vectors, hashlib and the xxhash binding") {
    // SHA-256: FIPS 180-2, Appendix B.1 ("abc") and B.2 (the 448-bit message).
    CHECK(reports::sha256Hex("abc") == "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    CHECK(reports::sha256Hex("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq") ==
          "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
    // The empty message (FIPS 180-4 examples, from memory).
    CHECK(reports::sha256Hex("") == "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
    // XXH128 of "" and "abc" as `xxh128sum` (Debian package xxhash 0.8.1) prints them.
    CHECK(reports::xxh128Hex("") == "99aa06d3014798d86001c324468d497f");
    CHECK(reports::xxh128Hex("abc") == "06b05ab6733a618578af5f94892f3950");

    testing::ScratchDirectory scratch("starcensus-checksums");
    const auto path = scratch.path() / "abc.txt";
    std::ofstream(path, std::ios::binary) << "abc";
    using reports::ChecksumAlgorithm;
    CHECK(reports::fileChecksum(path, ChecksumAlgorithm::Sha256) == reports::sha256Hex("abc"));
    CHECK(reports::fileChecksum(path, ChecksumAlgorithm::Xxh128) == reports::xxh128Hex("abc"));
    CHECK(reports::fileChecksum(path, ChecksumAlgorithm::None).empty());
    // A file larger than the 1 MiB read block, against /usr/bin/python3 hashlib and python3-xxhash.
    const auto big = scratch.path() / "big.bin";
    {
        std::ofstream out(big, std::ios::binary);
        for (std::size_t i = 0; i < 3'000'000; ++i) {
            out.put(static_cast<char>((i * 7919) % 251));
        }
    }
    for (const ChecksumAlgorithm algorithm : {ChecksumAlgorithm::Sha256, ChecksumAlgorithm::Xxh128}) {
        const std::string name = reports::checksumAlgorithmName(algorithm);
        const std::string expected =
            testing::runReferencePython("checksum_file.py", name + " " + big.string());
        CHECK(reports::fileChecksum(big, algorithm) == expected.substr(0, expected.find('\n')));
        CHECK(reports::checksumAlgorithmNamed(name) == algorithm);
    }
    CHECK_THROWS_WITH_AS(reports::fileChecksum(scratch.path() / "missing", ChecksumAlgorithm::Xxh128),
                         doctest::Contains("missing"), InputError);
    CHECK_THROWS_WITH_AS(reports::checksumAlgorithmNamed("md5"), doctest::Contains("--checksum"), InputError);
}

TEST_CASE("every option value is recorded, with the ones given on the command line") {
    namespace po = boost::program_options;
    po::options_description options;
    options.add_options()("radius", po::value<std::string>()->default_value("10"),
                          "")("draws", po::value<int>()->default_value(1000), "")(
        "seed", po::value<std::uint64_t>(), "")("group", po::value<std::vector<std::string>>()->composing(),
                                                "")("scale", po::value<double>()->default_value(1.5), "");
    po::variables_map values;
    po::store(po::command_line_parser(
                  std::vector<std::string>{"--seed", "7", "--group", "FGK=F,G,K", "--draws", "20"})
                  .options(options)
                  .run(),
              values);
    po::notify(values);
    const auto json = reports::optionValuesJson(values);
    CHECK(json["options"]["radius"] == "10");
    CHECK(json["options"]["draws"] == 20);
    CHECK(json["options"]["seed"] == 7);
    CHECK(json["options"]["scale"] == 1.5);
    CHECK(json["options"]["group"] == nlohmann::json::array({"FGK=F,G,K"}));
    CHECK(json["options_given"] == nlohmann::json::array({"draws", "group", "seed"}));
}

TEST_CASE("stage progress prints one line per stage when enabled and nothing when not") {
    std::ostringstream on;
    reports::StageProgress progress(on, true, 2);
    progress.begin("scan");
    progress.begin("draws");
    progress.end();
    progress.end();
    const std::string text = on.str();
    CHECK(text.rfind("starcensus: [1/2] scan ... ", 0) == 0);
    CHECK(text.find("\nstarcensus: [2/2] draws ... ") != std::string::npos);
    CHECK(std::count(text.begin(), text.end(), '\n') == 2);
    std::ostringstream off;
    reports::StageProgress quiet(off, false, 2);
    quiet.begin("scan");
    quiet.end();
    CHECK(off.str().empty());
}
