package h5

import "syscall"

func dup(fd int) (int, error) { return syscall.Dup(fd) }
func dup2(from, to int) error { return syscall.Dup3(from, to, 0) }
func closeFD(fd int)          { syscall.Close(fd) }
