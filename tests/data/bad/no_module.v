// a file with a comment and no module

