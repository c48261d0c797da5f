#include <renorm/io/atomic_file.hpp>

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <stdexcept>
#include <unistd.h>

namespace renorm::io {

namespace fs = std::filesystem;

void check_writable(const std::string& path, bool overwrite)
{
    if (path.empty())
        throw std::invalid_argument("output file name is empty");
    fs::path p(path);
    std::error_code ec;
    if (fs::is_directory(p, ec))
        throw std::invalid_argument("cannot write '" + path + "': it is a directory");
    if (fs::exists(p, ec) && !overwrite)
        throw std::invalid_argument("'" + path + "' exists; pass --force to replace it");
    fs::path dir = p.has_parent_path() ? p.parent_path() : fs::path(".");
    if (!fs::is_directory(dir, ec))
        throw std::invalid_argument("cannot write '" + path + "': directory '" + dir.string() +
                                    "' does not exist");
    if (::access(dir.c_str(), W_OK) != 0)
        throw std::invalid_argument("cannot write '" + path + "': directory '" + dir.string() +
                                    "' is not writable");
    if (fs::exists(p, ec) && ::access(p.c_str(), W_OK) != 0)
        throw std::invalid_argument("cannot write '" + path + "': permission denied");
}

void write_file_atomic(const std::string& path, const std::string& content)
{
    const std::string tmp = path + ".tmp." + std::to_string(::getpid());
    std::FILE* f = std::fopen(tmp.c_str(), "wb");
    if (!f)
        throw std::runtime_error("cannot write '" + tmp + "': " + std::strerror(errno));
    const bool ok = std::fwrite(content.data(), 1, content.size(), f) == content.size() &&
                    std::fflush(f) == 0 && ::fsync(::fileno(f)) == 0;
    const bool closed = std::fclose(f) == 0;
    if (!ok || !closed || std::rename(tmp.c_str(), path.c_str()) != 0) {
        const std::string why = std::strerror(errno);
        std::remove(tmp.c_str());
        throw std::runtime_error("cannot write '" + path + "': " + why);
    }
}

} // namespace renorm::io
