#include "photometry/base/AtomicOutput.h"

#include "photometry/base/InputError.h"

#include <fstream>
#include <system_error>
#include <unistd.h>

namespace starcensus {

AtomicOutput::AtomicOutput(std::filesystem::path final_path) : final_(std::move(final_path)) {
    temporary_ = final_;
    temporary_ += ".partial-" + std::to_string(::getpid());
    std::error_code ignored;
    std::filesystem::remove(temporary_, ignored);
}

AtomicOutput::~AtomicOutput() {
    if (!committed_) {
        std::error_code ignored;
        std::filesystem::remove(temporary_, ignored);
    }
}

void AtomicOutput::commit() {
    std::error_code error;
    std::filesystem::rename(temporary_, final_, error);
    if (error) {
        throw InputError("cannot write " + final_.string() + ": " + error.message());
    }
    committed_ = true;
}

void writeTextFileAtomically(const std::filesystem::path& path, const std::string& text) {
    AtomicOutput output(path);
    {
        std::ofstream stream(output.temporaryPath(), std::ios::binary);
        stream << text;
        stream.close();
        if (!stream) {
            throw InputError("cannot write " + path.string());
        }
    }
    output.commit();
}

} // namespace starcensus
