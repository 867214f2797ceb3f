module t(a, b, y);
  input [3:0] a;
  input [1:0] b;
  output [3:0] y;
  assign y = a & b;
endmodule
