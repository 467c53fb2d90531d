// Coverage tiles as textures, updated incrementally: a tile is (re)coloured and uploaded only when
// its generation or the palette changed; tiles not drawn for a while are released. The GPU side
// sits behind TextureBackend so the caching can be tested without a GPU.
#pragma once

#include <cstdint>
#include <map>
#include <memory>
#include <tuple>
#include <utility>
#include <vector>

#include "ui/panel.hpp"

namespace sg::ui {

class TextureBackend {
public:
    virtual ~TextureBackend() = default;
    // A new size x size RGBA8 texture; returns its handle for ImGui (never null on success).
    virtual ImTextureID create(int size) = 0;
    // Replaces the whole texture; `rgba` holds size*size pixels, top row first.
    virtual void upload(ImTextureID texture, int size, const std::vector<ImU32>& rgba) = 0;
    virtual void destroy(ImTextureID texture) = 0;
};

class TileTextureCache final : public TileTextureSource {
public:
    // evict_after_frames: a texture not requested for this many frames is released (>= 1).
    explicit TileTextureCache(std::unique_ptr<TextureBackend> backend, std::uint64_t evict_after_frames = 600);
    ~TileTextureCache() override;
    TileTextureCache(const TileTextureCache&) = delete;
    TileTextureCache& operator=(const TileTextureCache&) = delete;

    ImTextureID textureFor(const engine::CoverageTileView& tile, const Palette& palette) override;
    void endFrame() override;
    // Releases every texture (call while the GPU context is still current).
    void clear();

    std::uint64_t uploads() const { return m_uploads; }
    std::size_t residentTiles() const { return m_entries.size(); }

private:
    struct Entry {
        ImTextureID texture = nullptr;
        int size = 0;
        std::uint64_t generation = 0;
        const Palette* palette = nullptr;
        std::uint64_t last_used = 0;
    };
    std::unique_ptr<TextureBackend> m_backend;
    std::uint64_t m_evict_after;
    std::map<std::tuple<int, int, int>, Entry> m_entries;  // (layer, tx, ty)
    std::vector<ImU32> m_rgba;
    std::uint64_t m_frame = 0;
    std::uint64_t m_uploads = 0;
};

// The OpenGL backend (needs a current GL context on the calling thread).
std::unique_ptr<TextureBackend> makeGlTextureBackend();

}  // namespace sg::ui
