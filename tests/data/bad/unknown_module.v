module t(a, y);
  input a;
  output y;
  mystery u1 (.A(a), .Y(y));
endmodule
