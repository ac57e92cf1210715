#version 330 core
// Items as point sprites: a round disc, or (a_slot >= 0, pictures on, and the picture at least
// u_picture_min pixels on screen) the item's picture from the picture atlas. Size shrinks with
// distance and a disc's colour fades toward the ground, so depth reads on a software renderer
// without lighting; a picture keeps its own colours.
layout(location = 0) in vec3 a_position;
layout(location = 1) in vec4 a_colour;
layout(location = 2) in float a_size;
layout(location = 3) in uint a_flags;
layout(location = 4) in int a_slot;
layout(location = 5) in float a_aspect;

uniform mat4 u_view;
uniform mat4 u_projection;
uniform float u_reference_distance;
uniform float u_point_scale;
uniform float u_max_point_size;
uniform vec3 u_ground;
uniform float u_fade_near;
uniform float u_fade_far;
uniform float u_fade_amount;
uniform int u_pictures;
uniform float u_picture_size;
uniform float u_picture_min;
uniform float u_max_picture_size;

out vec3 v_colour;
out float v_alpha;
flat out uint v_flags;
flat out int v_slot;      // -1: a disc
flat out vec2 v_extent;   // the picture's share of the sprite's side, x and y
flat out float v_side;    // the sprite's side in pixels

void main() {
  vec4 eye = u_view * vec4(a_position, 1.0);
  gl_Position = u_projection * eye;
  float depth = max(-eye.z, 1e-4);
  float near = clamp(u_reference_distance / depth, 0.35, 3.0);
  float grow = 1.0;
  if ((a_flags & 1u) != 0u) grow = 1.35;
  if ((a_flags & 4u) != 0u) grow = 1.6;
  v_slot = -1;
  v_extent = vec2(1.0);
  float size = a_size * u_point_scale * near;
  if ((a_flags & 1u) != 0u) size = max(size * 1.35, size + 4.0);
  if ((a_flags & 4u) != 0u) size = max(size * 1.6, size + 6.0);
  size = clamp(size, 2.0, u_max_point_size);
  if (u_pictures != 0 && a_slot >= 0) {
    float side = u_picture_size * u_point_scale * near;
    if (side >= u_picture_min) {
      v_slot = a_slot;
      v_extent = a_aspect >= 1.0 ? vec2(1.0, 1.0 / a_aspect) : vec2(a_aspect, 1.0);
      size = min(side * grow, u_max_picture_size);
    }
  }
  gl_PointSize = size;
  v_side = size;
  float t = clamp((depth - u_fade_near) / max(u_fade_far - u_fade_near, 1e-6), 0.0, 1.0);
  float fade = ((a_flags & 13u) != 0u || v_slot >= 0) ? 0.0 : t * u_fade_amount;
  v_colour = mix(a_colour.rgb, u_ground, fade);
  v_alpha = a_colour.a;
  v_flags = a_flags;
}
