#version 330 core
in vec3 v_colour;
in float v_alpha;
flat in uint v_flags;
flat in int v_slot;
flat in vec2 v_extent;
flat in float v_side;
uniform vec3 u_ink;
uniform vec3 u_ground;
uniform sampler2DArray u_atlas;
out vec4 o_colour;

// Must match renderer.h: kSlotTexels, kSlotGuard, kLayerSide.
const float kSlotTexels = 64.0;
const float kSlotGuard = 4.0;
const float kLayerSide = 4.0;

void picture() {
  // q: -1..1 over the picture's rectangle (centred in the square sprite, its longer side filling it).
  vec2 q = (gl_PointCoord * 2.0 - 1.0) / v_extent;
  if (abs(q.x) > 1.0 || abs(q.y) > 1.0) discard;
  bool selected = (v_flags & 1u) != 0u;
  bool pinned = (v_flags & 2u) != 0u;
  bool hovered = (v_flags & 4u) != 0u;
  // The frame, in pixels from the rectangle's edge: the item's colour (its colour code stays
  // readable), ink with a ground line inside it when selected or hovered.
  vec2 half_px = 0.5 * v_side * v_extent;
  vec2 from_edge = (1.0 - abs(q)) * half_px;
  float edge = min(from_edge.x, from_edge.y);
  bool strong = selected || hovered;
  if (edge < (strong ? 3.0 : 1.5)) {
    o_colour = vec4(strong ? u_ink : v_colour, 1.0);
    return;
  }
  if (strong && edge < 4.0) {
    o_colour = vec4(u_ground, 1.0);
    return;
  }
  // A pin: an ink corner at the top left.
  vec2 corner = (q + 1.0) * half_px;
  if (pinned && corner.x + corner.y < max(8.0, 0.3 * v_side)) {
    o_colour = vec4(u_ink, 1.0);
    return;
  }
  float cell = float(v_slot % 16);
  float layer = float(v_slot / 16);
  vec2 box = (kSlotTexels - 2.0 * kSlotGuard) * v_extent;  // the picture inside the slot, texels
  vec2 in_slot = (kSlotTexels - box) * 0.5 + (q * 0.5 + 0.5) * box;
  vec2 uv = (vec2(mod(cell, kLayerSide), floor(cell / kLayerSide)) * kSlotTexels + in_slot) / (kSlotTexels * kLayerSide);
  o_colour = vec4(texture(u_atlas, vec3(uv, layer)).rgb, 1.0);
}

void main() {
  if (v_slot >= 0) {
    picture();
    return;
  }
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
