package tests

import (
	"bytes"
	"crypto/rand"
	"fmt"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// slurmCluster is a one-node Slurm cluster on localhost, started from
// Debian's slurm-wlm and munge packages with a generated configuration in
// a temporary directory: munged (authentication), slurmctld (the
// controller) and slurmd (the node, 2 CPUs), each in the foreground of a
// child process whose PID the test keeps to stop it.
type slurmCluster struct {
	dir   string
	conf  string
	procs []*daemon
	logs  map[string]string
}

// daemon is a started daemon; done closes when it has exited.
type daemon struct {
	name string
	cmd  *exec.Cmd
	done chan struct{}
}

func (d *daemon) exited() bool {
	select {
	case <-d.done:
		return true
	default:
		return false
	}
}

// env is the environment for Slurm's client commands (sbatch, scontrol).
func (c *slurmCluster) env() []string {
	return append(os.Environ(), "SLURM_CONF="+c.conf)
}

// startSlurm starts the cluster and waits (at most a minute) until the
// node takes jobs. It fails the test with the reason (a missing program,
// not root, the daemons' own last log lines) where the cluster cannot
// start; it never skips.
func startSlurm(t *testing.T) *slurmCluster {
	t.Helper()
	for _, prog := range []string{"munged", "slurmctld", "slurmd", "sbatch", "scontrol", "sinfo"} {
		if _, err := exec.LookPath(prog); err != nil {
			if _, err2 := os.Stat(filepath.Join("/usr/sbin", prog)); err2 != nil {
				t.Fatalf("the Slurm test needs %s (Debian packages slurm-wlm and munge; `make test-deps` installs them): %v", prog, err)
			}
		}
	}
	if os.Geteuid() != 0 {
		t.Fatalf("the Slurm test starts slurmd, which must run as root (make test runs as root in CI); running as uid %d", os.Geteuid())
	}
	host, err := os.Hostname()
	if err != nil {
		t.Fatalf("hostname: %v", err)
	}
	host, _, _ = strings.Cut(host, ".")
	// A short path: Unix socket paths are limited to 108 bytes.
	dir, err := os.MkdirTemp("", "flslurm")
	if err != nil {
		t.Fatal(err)
	}
	c := &slurmCluster{dir: dir, conf: filepath.Join(dir, "slurm.conf"), logs: map[string]string{}}
	t.Cleanup(func() { c.stop(t) })
	for _, d := range []string{"munge", "state", "spool", "log"} {
		if err := os.MkdirAll(filepath.Join(dir, d), 0o755); err != nil {
			t.Fatal(err)
		}
	}
	// munged insists that its key is private and its directories are not
	// writable by others.
	os.Chmod(dir, 0o711)
	os.Chmod(filepath.Join(dir, "munge"), 0o711)
	key := make([]byte, 1024)
	rand.Read(key)
	keyPath := filepath.Join(dir, "munge", "munge.key")
	if err := os.WriteFile(keyPath, key, 0o400); err != nil {
		t.Fatal(err)
	}
	sock := filepath.Join(dir, "munge", "munge.socket")
	c.start(t, "munged", "/usr/sbin/munged", "--foreground", "--force",
		"--socket="+sock, "--key-file="+keyPath,
		"--log-file="+filepath.Join(dir, "log", "munged.log"),
		"--pid-file="+filepath.Join(dir, "munge", "munged.pid"),
		"--seed-file="+filepath.Join(dir, "munge", "munged.seed"))
	c.waitFor(t, 20*time.Second, "munged to open its socket", func() bool {
		_, err := os.Stat(sock)
		return err == nil
	})

	ctlPort, dPort := freePort(t), freePort(t)
	conf := fmt.Sprintf(`# One-node test cluster written by Faultline's tests.
ClusterName=faultline-test
SlurmctldHost=%[1]s(127.0.0.1)
SlurmctldPort=%[2]d
SlurmdPort=%[3]d
SlurmUser=root
SlurmdUser=root
AuthType=auth/munge
AuthInfo=socket=%[4]s
CredType=cred/munge
StateSaveLocation=%[5]s/state
SlurmdSpoolDir=%[5]s/spool
SlurmctldPidFile=%[5]s/slurmctld.pid
SlurmdPidFile=%[5]s/slurmd.pid
SlurmctldLogFile=%[5]s/log/slurmctld.log
SlurmdLogFile=%[5]s/log/slurmd.log
ProctrackType=proctrack/linuxproc
TaskPlugin=task/none
SelectType=select/cons_tres
SelectTypeParameters=CR_CPU
SchedulerType=sched/builtin
ReturnToService=2
MpiDefault=none
JobAcctGatherType=jobacct_gather/none
AccountingStorageType=accounting_storage/none
JobCompType=jobcomp/none
MailProg=/bin/true
MinJobAge=600
NodeName=flnode NodeHostname=%[1]s NodeAddr=127.0.0.1 CPUs=2 State=UNKNOWN
PartitionName=flpart Nodes=flnode Default=YES MaxTime=INFINITE State=UP
`, host, ctlPort, dPort, sock, dir)
	if err := os.WriteFile(c.conf, []byte(conf), 0o644); err != nil {
		t.Fatal(err)
	}
	c.start(t, "slurmctld", "/usr/sbin/slurmctld", "-D", "-f", c.conf)
	c.waitFor(t, 30*time.Second, "slurmctld to answer", func() bool {
		out, err := c.command("scontrol", "ping")
		return err == nil && strings.Contains(out, "UP")
	})
	c.start(t, "slurmd", "/usr/sbin/slurmd", "-D", "-N", "flnode", "-f", c.conf)
	c.waitFor(t, 60*time.Second, "the node to be idle", func() bool {
		out, err := c.command("sinfo", "-h", "-N", "-o", "%t")
		return err == nil && strings.TrimSpace(out) == "idle"
	})
	return c
}

// start runs a daemon in the foreground of a child process.
func (c *slurmCluster) start(t *testing.T, name, prog string, args ...string) {
	t.Helper()
	cmd := exec.Command(prog, args...)
	cmd.Env = c.env()
	logPath := filepath.Join(c.dir, "log", name+".out")
	f, err := os.Create(logPath)
	if err != nil {
		t.Fatal(err)
	}
	cmd.Stdout, cmd.Stderr = f, f
	// Its own process group, so a terminal's Ctrl-C does not reach it
	// before the test stops it.
	cmd.SysProcAttr = &syscall.SysProcAttr{Setpgid: true}
	if err := cmd.Start(); err != nil {
		f.Close()
		t.Fatalf("starting %s: %v", name, err)
	}
	f.Close()
	c.logs[name] = logPath
	d := &daemon{name: name, cmd: cmd, done: make(chan struct{})}
	c.procs = append(c.procs, d)
	go func() { cmd.Wait(); close(d.done) }()
}

// command runs a Slurm client command against the cluster.
func (c *slurmCluster) command(name string, args ...string) (string, error) {
	cmd := exec.Command(name, args...)
	cmd.Env = c.env()
	var out bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &out
	err := cmd.Run()
	return out.String(), err
}

// waitFor polls ok every 200 ms until it holds or the time is up; then it
// fails the test with the daemons' last log lines.
func (c *slurmCluster) waitFor(t *testing.T, limit time.Duration, what string, ok func() bool) {
	t.Helper()
	deadline := time.Now().Add(limit)
	for time.Now().Before(deadline) {
		if ok() {
			return
		}
		for _, d := range c.procs {
			if d.exited() {
				t.Fatalf("waiting for %s: %s exited (%v)\n%s", what, d.name, d.cmd.ProcessState, c.logTails())
			}
		}
		time.Sleep(200 * time.Millisecond)
	}
	t.Fatalf("waited %s for %s; the Slurm cluster did not come up\n%s", limit, what, c.logTails())
}

// logTails returns the last lines of every daemon's log.
func (c *slurmCluster) logTails() string {
	var b strings.Builder
	paths := []string{}
	for _, p := range c.logs {
		paths = append(paths, p)
	}
	for _, n := range []string{"munged.log", "slurmctld.log", "slurmd.log"} {
		paths = append(paths, filepath.Join(c.dir, "log", n))
	}
	for _, p := range paths {
		data, err := os.ReadFile(p)
		if err != nil {
			continue
		}
		lines := strings.Split(strings.TrimSpace(string(data)), "\n")
		fmt.Fprintf(&b, "--- %s (last lines)\n%s\n", p, strings.Join(lines[max(0, len(lines)-12):], "\n"))
	}
	return b.String()
}

// stop ends the daemons by their PIDs, in reverse order of starting:
// SIGTERM, then SIGKILL after ten seconds.
func (c *slurmCluster) stop(t *testing.T) {
	for i := len(c.procs) - 1; i >= 0; i-- {
		d := c.procs[i]
		d.cmd.Process.Signal(syscall.SIGTERM)
		select {
		case <-d.done:
		case <-time.After(10 * time.Second):
			d.cmd.Process.Kill()
			<-d.done
			t.Logf("%s (pid %d) did not stop on SIGTERM; killed", d.name, d.cmd.Process.Pid)
		}
	}
	// slurmstepd processes of finished jobs exit by themselves; the
	// directory goes once the daemons are gone.
	os.RemoveAll(c.dir)
}

// freePort returns a TCP port free on localhost now.
func freePort(t *testing.T) int {
	t.Helper()
	l, err := net.Listen("tcp", "127.0.0.1:0")
	if err != nil {
		t.Fatal(err)
	}
	defer l.Close()
	return l.Addr().(*net.TCPAddr).Port
}
