module t(a, y);
  input a;
  output y;
  wire p, q;
  assign p = a & q;
  assign q = ~p;
  assign y = q;
endmodule
