#version 330 core
in vec3 v_colour;
in float v_alpha;
flat in uint v_flags;
uniform vec3 u_ink;
uniform vec3 u_ground;
out vec4 o_colour;

void main() {
  vec2 p = gl_PointCoord * 2.0 - 1.0;
  // The item's mark (flags bits 8-9, viewer/scene/colour_code.h): a disc, a ring, a square or a
  // diamond; r is the distance in that mark's own norm, 1 at its edge.
  uint mark = (v_flags >> 8) & 3u;
  float r = mark == 2u ? max(abs(p.x), abs(p.y)) * 1.12 : mark == 3u ? (abs(p.x) + abs(p.y)) * 0.98 : length(p);
  if (r > 1.0) discard;
  if (mark == 1u && r < 0.50 && (v_flags & 2u) == 0u) discard;  // a ring shows what lies behind (a pin keeps its dot)
  vec3 c = v_colour;
  // A slightly darker rim keeps touching discs apart.
  c = mix(c, c * 0.62, smoothstep(0.70, 0.95, r));
  bool selected = (v_flags & 1u) != 0u;
  bool pinned = (v_flags & 2u) != 0u;
  bool hovered = (v_flags & 4u) != 0u;
  if (selected || hovered) {
    if (r > 0.74) c = u_ink;
    else if (r > 0.62) c = u_ground;
  }
  if (pinned && r < 0.30) c = u_ink;  // a pin: a dark centre dot
  o_colour = vec4(c, v_alpha);
}
