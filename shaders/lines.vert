#version 330 core
layout(location = 0) in vec3 a_position;
layout(location = 1) in vec4 a_colour;
uniform mat4 u_view;
uniform mat4 u_projection;
out vec4 v_colour;
void main() {
  gl_Position = u_projection * u_view * vec4(a_position, 1.0);
  v_colour = a_colour;
}
