#version 330 core
// Picture cards: point sprites of fixed screen size that sample one slot of the picture atlas.
// The card sits above and to the right of its item so the item's disc stays visible.
layout(location = 0) in vec3 a_position;
layout(location = 1) in float a_size;
layout(location = 2) in float a_slot;
layout(location = 3) in vec4 a_frame;
uniform mat4 u_view;
uniform mat4 u_projection;
uniform vec2 u_viewport;
out float v_slot;
out vec4 v_frame;
out float v_size;
void main() {
  vec4 clip = u_projection * u_view * vec4(a_position, 1.0);
  vec2 offset_px = vec2(a_size * 0.5 + 6.0, a_size * 0.5 + 6.0);
  clip.xy += offset_px * 2.0 / u_viewport * clip.w;
  gl_Position = clip;
  gl_PointSize = a_size;
  v_slot = a_slot;
  v_frame = a_frame;
  v_size = a_size;
}
