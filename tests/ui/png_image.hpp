// A screenshot read back for pixel checks (the screen tests): RGB pixels, colour comparison.
#pragma once

#include <cstdlib>
#include <string>
#include <vector>

#include <imgui.h>
#include <stb_image.h>

namespace sg::testui {

struct Image {
    int w = 0, h = 0;
    std::vector<unsigned char> rgb;
    ImU32 at(int x, int y) const {
        const auto i = (static_cast<std::size_t>(y) * static_cast<std::size_t>(w) + static_cast<std::size_t>(x)) * 3;
        return IM_COL32(rgb[i], rgb[i + 1], rgb[i + 2], 255);
    }
};

// Reads a PNG as RGB; an empty image when it cannot be read.
inline Image loadPng(const std::string& path) {
    Image img;
    int n = 0;
    unsigned char* data = stbi_load(path.c_str(), &img.w, &img.h, &n, 3);
    if (!data) return img;
    img.rgb.assign(data, data + static_cast<std::size_t>(img.w) * static_cast<std::size_t>(img.h) * 3);
    stbi_image_free(data);
    return img;
}

// Every channel of a and b within tol.
inline bool near(ImU32 a, ImU32 b, int tol) {
    for (int shift : {0, 8, 16}) {
        const int x = static_cast<int>((a >> shift) & 0xFF), y = static_cast<int>((b >> shift) & 0xFF);
        if (std::abs(x - y) > tol) return false;
    }
    return true;
}

// Fraction of pixels in the (2r+1)^2 block around c within `tol` of `colour`.
inline double fractionNear(const Image& img, ImVec2 c, int r, ImU32 colour, int tol) {
    int hit = 0, all = 0;
    for (int y = static_cast<int>(c.y) - r; y <= static_cast<int>(c.y) + r; ++y)
        for (int x = static_cast<int>(c.x) - r; x <= static_cast<int>(c.x) + r; ++x) {
            if (x < 0 || y < 0 || x >= img.w || y >= img.h) continue;
            ++all;
            hit += near(img.at(x, y), colour, tol) ? 1 : 0;
        }
    return all ? static_cast<double>(hit) / all : 0.0;
}

}  // namespace sg::testui
