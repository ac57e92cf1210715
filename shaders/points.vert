#version 330 core
// Items as round point sprites: size shrinks with distance and colour fades toward the ground,
// so depth reads on a software renderer without lighting.
layout(location = 0) in vec3 a_position;
layout(location = 1) in vec4 a_colour;
layout(location = 2) in float a_size;
layout(location = 3) in uint a_flags;

uniform mat4 u_view;
uniform mat4 u_projection;
uniform float u_reference_distance;
uniform float u_point_scale;
uniform float u_max_point_size;
uniform vec3 u_ground;
uniform float u_fade_near;
uniform float u_fade_far;
uniform float u_fade_amount;

out vec3 v_colour;
out float v_alpha;
flat out uint v_flags;

void main() {
  vec4 eye = u_view * vec4(a_position, 1.0);
  gl_Position = u_projection * eye;
  float depth = max(-eye.z, 1e-4);
  float size = a_size * u_point_scale * clamp(u_reference_distance / depth, 0.35, 3.0);
  if ((a_flags & 1u) != 0u) size = max(size * 1.35, size + 4.0);
  if ((a_flags & 4u) != 0u) size = max(size * 1.6, size + 6.0);
  gl_PointSize = clamp(size, 2.0, u_max_point_size);
  float t = clamp((depth - u_fade_near) / max(u_fade_far - u_fade_near, 1e-6), 0.0, 1.0);
  float fade = ((a_flags & 13u) != 0u) ? 0.0 : t * u_fade_amount;
  v_colour = mix(a_colour.rgb, u_ground, fade);
  v_alpha = a_colour.a;
  v_flags = a_flags;
}
