// runScreen: the GLFW window, OpenGL 3.3 core context and ImGui backends around ScreenUi; frame
// pacing (no vsync under Xvfb, so the loop waits itself), settings persistence and screenshots.
#include "ui/screen.hpp"

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <thread>

#define GLFW_INCLUDE_NONE
#include <GLFW/glfw3.h>
#include <GL/gl.h>
#include <backends/imgui_impl_glfw.h>
#include <backends/imgui_impl_opengl3.h>
#include <stb_image_write.h>

#include "ui/tile_textures.hpp"

namespace sg::ui {
namespace {

std::string g_glfw_error;

void onGlfwError(int code, const char* text) {
    g_glfw_error = "GLFW error " + std::to_string(code) + ": " + (text ? text : "");
}

double steadySeconds() {
    using namespace std::chrono;
    return duration<double>(steady_clock::now().time_since_epoch()).count();
}

// Reads the back buffer (before the swap) and writes it as an RGB PNG, top row first.
void writeScreenshot(const std::string& path, int w, int h) {
    std::vector<unsigned char> px(static_cast<std::size_t>(w) * static_cast<std::size_t>(h) * 3);
    glReadBuffer(GL_BACK);
    glPixelStorei(GL_PACK_ALIGNMENT, 1);
    glReadPixels(0, 0, w, h, GL_RGB, GL_UNSIGNED_BYTE, px.data());
    const std::size_t row = static_cast<std::size_t>(w) * 3;
    std::vector<unsigned char> flipped(px.size());
    for (int y = 0; y < h; ++y)
        std::copy_n(px.data() + static_cast<std::size_t>(h - 1 - y) * row, row,
                    flipped.data() + static_cast<std::size_t>(y) * row);
    if (!stbi_write_png(path.c_str(), w, h, 3, flipped.data(), static_cast<int>(row)))
        throw ScreenError("cannot write screenshot " + path);
}

// Owns GLFW, the window and the ImGui context; releases them in order whatever happens.
class Window {
public:
    Window(const ScreenOptions& o) {
        glfwSetErrorCallback(onGlfwError);
        if (!glfwInit()) throw ScreenError("cannot start GLFW: " + g_glfw_error);
        glfwWindowHint(GLFW_CONTEXT_VERSION_MAJOR, 3);
        glfwWindowHint(GLFW_CONTEXT_VERSION_MINOR, 3);
        glfwWindowHint(GLFW_OPENGL_PROFILE, GLFW_OPENGL_CORE_PROFILE);
        glfwWindowHint(GLFW_OPENGL_FORWARD_COMPAT, GLFW_TRUE);
        m_window = glfwCreateWindow(o.width, o.height, o.title.c_str(), nullptr, nullptr);
        if (!m_window) {
            glfwTerminate();
            throw ScreenError("cannot open a window with OpenGL 3.3 core: " + g_glfw_error);
        }
        glfwMakeContextCurrent(m_window);
        glfwSwapInterval(1);
        IMGUI_CHECKVERSION();
        ImGui::CreateContext();
        ImGui::GetIO().IniFilename = nullptr;  // our own settings file, no imgui.ini in the cwd
        ImGui_ImplGlfw_InitForOpenGL(m_window, true);
        ImGui_ImplOpenGL3_Init("#version 330 core");
    }
    ~Window() {
        ImGui_ImplOpenGL3_Shutdown();
        ImGui_ImplGlfw_Shutdown();
        ImGui::DestroyContext();
        glfwDestroyWindow(m_window);
        glfwTerminate();
    }
    Window(const Window&) = delete;
    Window& operator=(const Window&) = delete;
    GLFWwindow* get() const { return m_window; }

private:
    GLFWwindow* m_window = nullptr;
};

}  // namespace

std::string screenUnavailableReason() {
    const char* x = std::getenv("DISPLAY");
    const char* wl = std::getenv("WAYLAND_DISPLAY");
    if ((!x || !*x) && (!wl || !*wl))
        return "no display (DISPLAY is not set); run under xvfb-run -a or use the headless mode";
    return {};
}

int runScreen(SnapshotBox& box, CommandSink& commands, const ScreenOptions& o) {
    // Without a display glfwInit fails; say why before touching GLFW.
    if (auto why = screenUnavailableReason(); !why.empty()) throw ScreenError(why);

    const std::string settings_path =
        o.settings_path == "none" ? std::string() : (o.settings_path.empty() ? defaultSettingsPath() : o.settings_path);
    std::vector<std::string> warnings;
    ScreenSettings settings = loadSettings(settings_path, warnings);
    for (const auto& w : warnings) std::fprintf(stderr, "swathguard screen: %s\n", w.c_str());

    Window window(o);
    TileTextureCache textures(makeGlTextureBackend());
    ScreenUi ui(std::move(settings), commands, textures);

    const double t_start = steadySeconds();
    double last_input = t_start;
    ImVec2 last_mouse{-1, -1};
    std::uint64_t last_seq = ~std::uint64_t{0};
    auto save = [&] {
        if (settings_path.empty()) return;
        std::string err;
        if (!saveSettings(settings_path, ui.settings(), err))
            std::fprintf(stderr, "swathguard screen: settings not saved: %s\n", err.c_str());
    };

    for (std::uint64_t frame = 0;; ++frame) {
        const double frame_start = steadySeconds();
        glfwPollEvents();
        if (glfwWindowShouldClose(window.get()) || (o.stop && o.stop->load())) break;
        if (o.frame_hook) o.frame_hook(frame);

        const std::shared_ptr<const engine::Snapshot> snap = box.latest();
        if (ui.prepareFonts()) {
            ImGui_ImplOpenGL3_DestroyFontsTexture();
            ImGui_ImplOpenGL3_CreateFontsTexture();
        }
        ImGui_ImplOpenGL3_NewFrame();
        ImGui_ImplGlfw_NewFrame();
        ui.frame(snap.get(), frame_start - t_start);

        int fb_w = 0, fb_h = 0;
        glfwGetFramebufferSize(window.get(), &fb_w, &fb_h);
        glViewport(0, 0, fb_w, fb_h);
        const ImVec4 bg = ImGui::ColorConvertU32ToFloat4(ui.palette().background);
        glClearColor(bg.x, bg.y, bg.z, 1.0f);
        glClear(GL_COLOR_BUFFER_BIT);
        ImGui_ImplOpenGL3_RenderDrawData(ImGui::GetDrawData());

        const bool shot_due = !o.screenshot_path.empty() &&
                              (o.after_frames > 0 ? frame + 1 >= static_cast<std::uint64_t>(o.after_frames)
                                                  : frame_start - t_start >= o.after_seconds);
        if (shot_due) writeScreenshot(o.screenshot_path, fb_w, fb_h);
        glfwSwapBuffers(window.get());
        if (shot_due) break;

        const double now = steadySeconds();
        if (ui.takeSettingsChanged()) save();  // operator changes are rare: save at once

        // Pacing: at most max_fps; idle_fps when nothing moved, no new state and no banner.
        const ImGuiIO& io = ImGui::GetIO();
        if (io.MousePos.x != last_mouse.x || io.MousePos.y != last_mouse.y || ImGui::IsAnyMouseDown() ||
            io.MouseWheel != 0.0f || !io.InputQueueCharacters.empty()) {
            last_input = now;
            last_mouse = io.MousePos;
        }
        const std::uint64_t seq = snap ? snap->seq : ~std::uint64_t{0};
        const bool busy = seq != last_seq || ui.bannerShown() || now - last_input < 1.0;
        last_seq = seq;
        const double min_end = frame_start + 1.0 / std::max(o.max_fps, 1.0);
        for (double t = steadySeconds(); t < min_end; t = steadySeconds()) glfwWaitEventsTimeout(min_end - t);
        if (!busy) {
            const double idle_end = frame_start + 1.0 / std::clamp(o.idle_fps, 0.5, o.max_fps);
            const double t = steadySeconds();
            if (t < idle_end) glfwWaitEventsTimeout(idle_end - t);  // returns early on input
        }
    }
    textures.clear();  // while the GL context is still current
    return 0;
}

}  // namespace sg::ui
