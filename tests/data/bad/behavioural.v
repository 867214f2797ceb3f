module t(a, b, y);
  input a, b;
  output reg y;
  always @(*) begin
    if (a) y = b;
  end
endmodule
