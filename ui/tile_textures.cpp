// Incremental tile texture cache and its OpenGL backend.
#include "ui/tile_textures.hpp"

#include <cstdint>

#include <GL/gl.h>

namespace sg::ui {

void colourTile(const engine::CoverageTileView& tile, const Palette& palette, std::vector<ImU32>& rgba) {
    const auto n = static_cast<std::size_t>(std::max(tile.size_cells, 0));
    rgba.assign(n * n, 0u);
    if (!tile.margin_q || tile.margin_q->size() < n * n) return;
    // Palette lookup once per quantised value, not per cell.
    ImU32 lut[256];
    for (int q = 0; q < 256; ++q) lut[q] = palette.marginColour(static_cast<std::uint8_t>(q));
    const std::uint8_t* src = tile.margin_q->data();
    for (std::size_t row = 0; row < n; ++row) {
        // Raster rows run from the south; textures from the top (north).
        const std::uint8_t* in = src + row * n;
        ImU32* out = rgba.data() + (n - 1 - row) * n;
        for (std::size_t col = 0; col < n; ++col) out[col] = lut[in[col]];
    }
}

TileTextureCache::TileTextureCache(std::unique_ptr<TextureBackend> backend, std::uint64_t evict_after_frames)
    : m_backend(std::move(backend)), m_evict_after(std::max<std::uint64_t>(evict_after_frames, 1)) {}

TileTextureCache::~TileTextureCache() { clear(); }

void TileTextureCache::clear() {
    for (auto& [key, e] : m_entries)
        if (e.texture) m_backend->destroy(e.texture);
    m_entries.clear();
}

ImTextureID TileTextureCache::textureFor(const engine::CoverageTileView& tile, const Palette& palette) {
    if (tile.size_cells <= 0 || !tile.margin_q) return nullptr;
    Entry& e = m_entries[{tile.layer, tile.tx, tile.ty}];
    if (e.texture && e.size != tile.size_cells) {
        m_backend->destroy(e.texture);
        e = Entry{};
    }
    if (!e.texture) {
        e.texture = m_backend->create(tile.size_cells);
        e.size = tile.size_cells;
        e.palette = nullptr;  // forces the first upload
    }
    if (!e.texture) return nullptr;
    if (e.palette != &palette || e.generation != tile.generation) {
        colourTile(tile, palette, m_rgba);
        m_backend->upload(e.texture, e.size, m_rgba);
        e.generation = tile.generation;
        e.palette = &palette;
        ++m_uploads;
    }
    e.last_used = m_frame;
    return e.texture;
}

void TileTextureCache::endFrame() {
    ++m_frame;
    for (auto it = m_entries.begin(); it != m_entries.end();) {
        if (m_frame - it->second.last_used > m_evict_after) {
            if (it->second.texture) m_backend->destroy(it->second.texture);
            it = m_entries.erase(it);
        } else {
            ++it;
        }
    }
}

namespace {

ImTextureID toId(GLuint t) { return reinterpret_cast<ImTextureID>(static_cast<std::uintptr_t>(t)); }
GLuint fromId(ImTextureID t) { return static_cast<GLuint>(reinterpret_cast<std::uintptr_t>(t)); }

class GlTextureBackend final : public TextureBackend {
public:
    ImTextureID create(int size) override {
        GLuint tex = 0;
        glGenTextures(1, &tex);
        if (tex == 0) return nullptr;
        glBindTexture(GL_TEXTURE_2D, tex);
        // Nearest: a cell stays a crisp square when zoomed in.
        glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_MIN_FILTER, GL_NEAREST);
        glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_MAG_FILTER, GL_NEAREST);
        glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_WRAP_S, GL_CLAMP_TO_EDGE);
        glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_WRAP_T, GL_CLAMP_TO_EDGE);
        glTexImage2D(GL_TEXTURE_2D, 0, GL_RGBA8, size, size, 0, GL_RGBA, GL_UNSIGNED_BYTE, nullptr);
        return toId(tex);
    }
    void upload(ImTextureID texture, int size, const std::vector<ImU32>& rgba) override {
        glBindTexture(GL_TEXTURE_2D, fromId(texture));
        glPixelStorei(GL_UNPACK_ALIGNMENT, 4);
        // ImU32 from IM_COL32 is R in the lowest byte: RGBA byte order on little-endian machines.
        glTexSubImage2D(GL_TEXTURE_2D, 0, 0, 0, size, size, GL_RGBA, GL_UNSIGNED_BYTE, rgba.data());
    }
    void destroy(ImTextureID texture) override {
        const GLuint t = fromId(texture);
        glDeleteTextures(1, &t);
    }
};

}  // namespace

std::unique_ptr<TextureBackend> makeGlTextureBackend() { return std::make_unique<GlTextureBackend>(); }

}  // namespace sg::ui
