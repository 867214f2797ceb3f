module t(a, y);
  input a;
  output y;
  wire w, v;
  and g1 (y, a, w);
  or g2 (v, a, a);
endmodule
