#version 330 core
in float v_slot;
in vec4 v_frame;
in float v_size;
uniform sampler2D u_atlas;
uniform float u_atlas_side;  // slots per side
out vec4 o_colour;
void main() {
  vec2 uv = gl_PointCoord;
  float border = 3.0 / v_size;
  if (uv.x < border || uv.y < border || uv.x > 1.0 - border || uv.y > 1.0 - border) {
    o_colour = v_frame;
    return;
  }
  uv = (uv - border) / (1.0 - 2.0 * border);
  float slot = floor(v_slot + 0.5);
  vec2 cell = vec2(mod(slot, u_atlas_side), floor(slot / u_atlas_side));
  vec4 texel = texture(u_atlas, (cell + uv) / u_atlas_side);
  o_colour = vec4(mix(v_frame.rgb, texel.rgb, texel.a), 1.0);
}
