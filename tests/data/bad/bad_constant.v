module t(a, y);
  input a;
  output [1:0] y;
  assign y = 2'b1x;
endmodule
