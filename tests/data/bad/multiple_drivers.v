module t(a, b, y);
  input a, b;
  output y;
  xor g1 (y, a, b);
  and g2 (y, a, b);
endmodule
