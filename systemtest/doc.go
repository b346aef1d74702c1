// Package systemtest checks Parley as a whole from outside: the real
// binary started as a child process and killed at random moments (crash
// safety), stopped with SIGTERM mid-request (graceful shutdown), and a
// workshop's worth of simulated experts on loopback (load). It holds no
// code of its own beyond this comment; everything is in its tests.
//
// All traffic goes to 127.0.0.1; every test is bounded in requests and
// time and stops by itself.
package systemtest
