module t(a, y);
  input a;
  output y;
  assign y = a[3];
endmodule
