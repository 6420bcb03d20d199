"""Serve a Python environment, and policies that act in it, to reckon.

A file that reckon runs as ``{"kind": "process", "command": ["python3", "./my_env.py"]}``
ends with::

    from reckon_bridge import serve
    serve(make_env)                                   # reckon's policies act
    serve(make_env, policies={"careful": make_careful})  # and policies of this file

reckon puts this file's folder on PYTHONPATH. Standard library only; numpy is used, when it
is installed, for the generator a policy receives.

``make_env(options)`` returns an object with

- ``reset(seed)`` returning ``(observation, info)`` and ``step(action)`` returning
  ``(observation, reward, terminated, truncated, info)``: the field's common interface.
  ``action`` is an index ``0 .. len(actions) - 1``;
- ``actions`` (a list of names) or ``action_space.n``;
- optionally ``discount`` (default 1), ``horizon``, ``reward_bounds = (low, high)`` and
  ``state_name(observation)`` (default ``str(observation)``): reckon's own policies see a
  state by this name (a table policy keys on it).

``make_policy(options, actions)`` returns an object with ``act(observation, rng)`` (an action
index or name) and optionally ``probabilities(observation)``: one probability per action, which
``estimate --record`` writes beside each step (it must not draw from ``rng``).

Seeds. Episode i's environment is reset with a 64-bit seed taken from reckon's ENV stream of
episode i, and a policy of this file gets a generator seeded with a 64-bit seed from the POLICY
stream of episode i (``numpy.random.default_rng(seed)``, or ``random.Random(seed)`` without
numpy). Draw only from these: the global ``random`` or ``numpy.random`` state would make results
depend on which process ran which episode.

Returns on the episode path (a policy of this file acting). The discounted return is summed in
step order, ``g += w * r; w *= discount`` starting from ``g = 0.0, w = 1.0``, in IEEE doubles:
the order reckon's own rollout uses, so the same rewards give the same bits.

Protocol, version 2: one JSON object per line, each way, on stdin and stdout. While serving,
``sys.stdout`` and file descriptor 1 point at stderr, so a stray ``print`` is shown by reckon
(prefixed) instead of breaking the protocol. reckon may send a message before the answer to
the previous one arrives; they are answered one by one, in order.

- ``{"reckon": 2, "op": "open", "options": {...}}`` -> ``{"reckon": 2, "ok": "open",
  "actions": [...], "discount": d, "horizon": h, "reward_bounds": [lo, hi], "policies": [...]}``
- ``{"op": "policy", "name": N, "options": {...}}`` -> ``{"ok": "policy", "probabilities": bool}``
  (whether it has ``probabilities(observation)``, which recording needs)
- ``{"op": "step", "reset": [slot, seed, slot, seed, ...], "act": [slot, action, ...]}`` ->
  ``{"n": [...], "w": [...], "e": [...], "s": [...]}``: one environment per slot, flat pairs
  (fewer brackets to write and parse than a list per command). The resets run first, in
  order, each answering its state name in ``n``; then the steps, in order, each answering
  its reward in ``w``, its end in ``e`` (0 going on, 1 terminated, 2 truncated) and its
  state name in ``s``. Commands are indexed in that order (resets first)
  where a failure names one.
- ``{"op": "episodes", "policy": N, "horizon": H, "items": [[env_seed, policy_seed], ...]}`` -> one or more
  ``{"returns": [...], "lengths": [...], "more": bool}``, at least every 50 ms while working.
- ``{"op": "record", ...}``, the fields of ``episodes`` -> one or more ``{"episodes": [...],
  "returns": [...], "more": bool}``: the same episodes, each a list of steps ``[state, action,
  reward, probabilities, next_state, end]`` (end ``"terminal"``, ``"truncated"`` or null), for
  ``estimate --record``. ``probabilities(observation)`` must not draw from the policy's rng.
- any failure -> ``{"error": {"index", "step", "call", "what", "message", "traceback"}}``;
  on SIGUSR1 (reckon's step timeout) -> ``{"hung": {"index", "step", "traceback"}}``.
"""

import json
import math
import os
import random
import signal
import sys
import time
import traceback

PROTOCOL = 2
FLUSH_SECONDS = 0.05
TRACEBACK_LINES = 8

try:
    import numpy as _numpy
except ImportError:  # the helper works without numpy; policies then get random.Random
    _numpy = None


def make_rng(seed):
    """The generator reckon's seeds are meant for: numpy's default one when present."""
    if _numpy is not None:
        return _numpy.random.default_rng(seed)
    return random.Random(seed)


class _Failure(Exception):
    """A user call failed; carries what reckon needs to name the episode and step."""

    def __init__(self, call, message, what="threw", tb=None):
        super().__init__(message)
        self.call = call
        self.what = what
        self.message = message
        self.tb = tb or []


def _tail(lines):
    text = "".join(lines).rstrip("\n").split("\n")
    return text[-TRACEBACK_LINES:]


def _users_frames(frames):
    """The frames of a traceback or stack that are the user's code, not this helper's."""
    return [f for f in frames if os.path.abspath(f.filename) != _HERE]


def _threw(call, error):
    frames = _users_frames(traceback.extract_tb(error.__traceback__))
    lines = traceback.format_list(frames) + traceback.format_exception_only(type(error), error)
    return _Failure(call, "%s: %s" % (type(error).__name__, error), "threw", _tail(lines))


_HERE = os.path.abspath(__file__)
# Which call a helper frame makes into the user's code, when the innermost helper frame is it.
_CALL_OF_FRAME = {"_step": "step", "_reset": "reset", "_name": "state_name", "_new_env": "make_env", "episodes": "act", "record": "act", "policy": "make_policy"}


def _hang_report(frame, pos):
    """Where the program is stuck: the call into the user's code and the user's frames."""
    inner = None
    f = frame
    while f is not None:
        if os.path.abspath(f.f_code.co_filename) == _HERE:
            inner = f.f_code.co_name
            break
        f = f.f_back
    call = _CALL_OF_FRAME.get(inner, "step")
    if inner == "step" and f is not None:
        call = f.f_locals.get("call", call)  # the step loop calls step and state_name itself
    frames = _users_frames(traceback.extract_stack(frame))
    return {"index": pos[0], "step": pos[1], "call": call, "traceback": _tail(traceback.format_list(frames))}


def _describe(value):
    if isinstance(value, str):
        return "%r (a string)" % value
    if value is None:
        return "None"
    return repr(value)


class _Bridge:
    def __init__(self, make_env, policies):
        self.make_env = make_env
        self.policy_makers = dict(policies or {})
        self.policies = {}
        self.options = {}
        self.envs = {}
        # Per slot of the step path: (env, its bound step, its state_name or None), looked up once.
        self.steppers = {}
        self.pos = [0, -1]
        self.actions = []
        self.discount = 1.0
        self.horizon = None
        self.low = -math.inf
        self.high = math.inf

    # -- set-up ---------------------------------------------------------------------------
    def _new_env(self):
        try:
            return self.make_env(self.options)
        except Exception as error:
            raise _threw("make_env", error)

    def open(self, message):
        if message.get("reckon") != PROTOCOL:
            raise _Failure(
                "open",
                "reckon speaks protocol %r and this reckon_bridge.py speaks %d: use the helper shipped with your reckon"
                % (message.get("reckon"), PROTOCOL),
                "refused",
            )
        self.options = message.get("options") or {}
        env = self._new_env()
        self.envs[0] = env
        actions = getattr(env, "actions", None)
        if actions is None:
            space = getattr(env, "action_space", None)
            count = getattr(space, "n", None)
            if count is None:
                raise _Failure("make_env", "the environment has neither `actions` (a list of names) nor `action_space.n`", "returned")
            actions = [str(i) for i in range(int(count))]
        self.actions = [str(a) for a in actions]
        self.discount = float(getattr(env, "discount", 1.0))
        horizon = getattr(env, "horizon", None)
        self.horizon = None if horizon is None else int(horizon)
        bounds = getattr(env, "reward_bounds", None)
        if bounds is not None:
            self.low, self.high = float(bounds[0]), float(bounds[1])
        return {
            "reckon": PROTOCOL,
            "ok": "open",
            "actions": self.actions,
            "discount": self.discount,
            "horizon": self.horizon,
            "reward_bounds": None if bounds is None else [self.low, self.high],
            "policies": sorted(self.policy_makers),
        }

    def policy(self, message):
        name = message.get("name")
        if name not in self.policy_makers:
            raise _Failure("make_policy", "no policy named %r (this file serves %s)" % (name, sorted(self.policy_makers) or "none"), "refused")
        try:
            self.policies[name] = self.policy_makers[name](message.get("options") or {}, list(self.actions))
        except Exception as error:
            raise _threw("make_policy", error)
        if not callable(getattr(self.policies[name], "act", None)):
            raise _Failure("make_policy", "policy %r has no act(observation, rng) method" % name, "returned")
        return {"ok": "policy", "probabilities": callable(getattr(self.policies[name], "probabilities", None))}

    # -- calls into the user's code, checked --------------------------------------------
    def _reset(self, env, seed):
        try:
            result = env.reset(seed=seed)
        except Exception as error:
            raise _threw("reset", error)
        if not (isinstance(result, tuple) and len(result) == 2):
            raise _Failure("reset", "returned %s; reset(seed) must return (observation, info)" % _describe(result), "returned")
        return result[0]

    def _step(self, env, action):
        try:
            result = env.step(action)
        except Exception as error:
            raise _threw("step", error)
        if not (isinstance(result, tuple) and len(result) == 5):
            raise _Failure("step", "returned %s; step(action) must return (observation, reward, terminated, truncated, info)" % _describe(result), "returned")
        return result

    def _reward(self, reward):
        try:
            r = float(reward)
        except (TypeError, ValueError):
            raise _Failure("step", "%s is not a finite number" % _describe(reward), "returned a bad reward")
        if not math.isfinite(r):
            raise _Failure("step", "%s is not a finite number" % r, "returned a bad reward")
        if r < self.low or r > self.high:
            raise _Failure(
                "step",
                "%r is outside the reward_bounds [%r, %r] it declares; fix the reward or the bounds" % (r, self.low, self.high),
                "returned a bad reward",
            )
        return r

    def _name(self, env, observation):
        namer = getattr(env, "state_name", None)
        try:
            return str(namer(observation)) if namer is not None else str(observation)
        except Exception as error:
            raise _threw("state_name", error)

    def _action(self, chosen):
        n = len(self.actions)
        if chosen.__class__ is int and 0 <= chosen < n:
            return chosen
        if isinstance(chosen, str) and chosen in self.actions:
            return self.actions.index(chosen)
        try:
            index = int(chosen)
            if index == chosen and 0 <= index < n and not isinstance(chosen, (bool, str)):
                return index
        except (TypeError, ValueError):
            pass
        raise _Failure("act", "%s is not one of 0..%d (nor a name among %s)" % (_describe(chosen), n - 1, ", ".join(self.actions)), "chose a bad action")

    # -- the two ways to act -------------------------------------------------------------
    def step(self, message):
        """One step of each episode running side by side: resets first, then steps, as sent."""
        pos = self.pos
        envs = self.envs
        resets = message.get("reset") or ()
        names = []
        k = 0
        for i in range(0, len(resets), 2):
            pos[0] = k
            slot = resets[i]
            env = envs.get(slot)
            if env is None:
                env = envs[slot] = self._new_env()
            names.append(self._name(env, self._reset(env, resets[i + 1])))
            k += 1
        acts = message.get("act") or ()
        rewards = []
        ends = []
        states = []
        low = self.low
        high = self.high
        steppers = self.steppers
        call = "step"
        try:
            for i in range(0, len(acts), 2):
                pos[0] = k
                slot = acts[i]
                stepper = steppers.get(slot)
                if stepper is None or stepper[0] is not envs[slot]:
                    env = envs[slot]
                    stepper = steppers[slot] = (env, env.step, getattr(env, "state_name", None))
                call = "step"
                result = stepper[1](acts[i + 1])
                if not (isinstance(result, tuple) and len(result) == 5):
                    raise _Failure("step", "returned %s; step(action) must return (observation, reward, terminated, truncated, info)" % _describe(result), "returned")
                observation, reward, terminated, truncated, _ = result
                rewards.append(reward if reward.__class__ is float and low <= reward <= high and reward - reward == 0.0 else self._reward(reward))
                ends.append(1 if terminated else 2 if truncated else 0)
                call = "state_name"
                namer = stepper[2]
                states.append(str(observation) if namer is None else str(namer(observation)))
                k += 1
        except _Failure:
            raise
        except Exception as error:
            raise _threw(call, error)
        return {"n": names, "w": rewards, "e": ends, "s": states}

    def episodes(self, message, send):
        policy = self.policies.get(message["policy"])
        if policy is None:
            raise _Failure("make_policy", "policy %r was not opened" % message["policy"], "refused")
        env = self.envs[0]
        act = policy.act
        horizon = message.get("horizon") or self.horizon or 2**62
        gamma = self.discount
        pos = self.pos
        returns = []
        lengths = []
        last = time.perf_counter()
        for k, (env_seed, policy_seed) in enumerate(message["items"]):
            pos[0] = k
            pos[1] = 0
            observation = self._reset(env, env_seed)
            rng = make_rng(policy_seed)
            g = 0.0
            w = 1.0
            t = 0
            while t < horizon:
                pos[1] = t
                try:
                    chosen = act(observation, rng)
                except Exception as error:
                    raise _threw("act", error)
                action = chosen if chosen.__class__ is int and 0 <= chosen < len(self.actions) else self._action(chosen)
                observation, reward, terminated, truncated, _ = self._step(env, action)
                r = reward if reward.__class__ is float and self.low <= reward <= self.high and reward - reward == 0.0 else self._reward(reward)
                g += w * r
                w *= gamma
                t += 1
                if terminated or truncated:
                    break
            returns.append(g)
            lengths.append(t)
            now = time.perf_counter()
            if now - last > FLUSH_SECONDS:
                send({"returns": returns, "lengths": lengths, "more": True})
                returns = []
                lengths = []
                last = now
        return {"returns": returns, "lengths": lengths, "more": False}

    def record(self, message, send):
        """The episodes of ``episodes``, drawn the same way, with every step and the policy's probabilities."""
        name = message["policy"]
        policy = self.policies.get(name)
        if policy is None:
            raise _Failure("make_policy", "policy %r was not opened" % name, "refused")
        probabilities = getattr(policy, "probabilities", None)
        if not callable(probabilities):
            raise _Failure("make_policy", "policy %r has no probabilities(observation) method, which recording needs" % name, "refused")
        env = self.envs[0]
        act = policy.act
        n = len(self.actions)
        horizon = message.get("horizon") or self.horizon or 2**62
        gamma = self.discount
        pos = self.pos
        episodes = []
        returns = []
        last = time.perf_counter()
        for k, (env_seed, policy_seed) in enumerate(message["items"]):
            pos[0] = k
            pos[1] = 0
            observation = self._reset(env, env_seed)
            state = self._name(env, observation)
            rng = make_rng(policy_seed)
            g = 0.0
            w = 1.0
            t = 0
            steps = []
            while t < horizon:
                pos[1] = t
                try:
                    row = [float(p) for p in probabilities(observation)]
                except Exception as error:
                    raise _threw("probabilities", error)
                if len(row) != n or not all(math.isfinite(p) and p >= 0 for p in row) or abs(sum(row) - 1) > 1e-9:
                    raise _Failure("probabilities", "returned %s; probabilities(observation) must give %d non-negative numbers that sum to 1" % (_describe(row), n), "returned")
                try:
                    chosen = act(observation, rng)
                except Exception as error:
                    raise _threw("act", error)
                action = self._action(chosen)
                observation, reward, terminated, truncated, _ = self._step(env, action)
                r = self._reward(reward)
                g += w * r
                w *= gamma
                t += 1
                following = self._name(env, observation)
                end = "terminal" if terminated else "truncated" if truncated or t >= horizon else None
                steps.append([state, action, r, row, following, end])
                state = following
                if terminated or truncated:
                    break
            episodes.append(steps)
            returns.append(g)
            now = time.perf_counter()
            if now - last > FLUSH_SECONDS:
                send({"episodes": episodes, "returns": returns, "more": True})
                episodes = []
                returns = []
                last = now
        return {"episodes": episodes, "returns": returns, "more": False}


def serve(make_env, policies=None):
    """Answers reckon's messages on stdin/stdout until stdin closes."""
    sys.stdout.flush()  # anything printed before serve() reaches reckon, which reports it
    out_fd = os.dup(1)
    os.dup2(2, 1)
    sys.stdout = sys.stderr
    stdin = sys.stdin.buffer
    bridge = _Bridge(make_env, policies)

    def send(message):
        data = (json.dumps(message, separators=(",", ":"), allow_nan=False) + "\n").encode()
        view = memoryview(data)
        while view:
            written = os.write(out_fd, view)
            view = view[written:]

    def on_hang_signal(signum, frame):
        send({"hung": _hang_report(frame, bridge.pos)})
        os._exit(3)

    if hasattr(signal, "SIGUSR1"):
        signal.signal(signal.SIGUSR1, on_hang_signal)

    while True:
        line = stdin.readline()
        if not line:
            return
        bridge.pos[0] = 0
        bridge.pos[1] = -1
        try:
            message = json.loads(line)
            op = message.get("op")
            if op == "open":
                reply = bridge.open(message)
            elif op == "step":
                reply = bridge.step(message)
            elif op == "episodes":
                reply = bridge.episodes(message, send)
            elif op == "record":
                reply = bridge.record(message, send)
            elif op == "policy":
                reply = bridge.policy(message)
            else:
                raise _Failure("open", "unknown message %r" % op, "refused")
        except _Failure as failure:
            reply = {
                "reckon": PROTOCOL,
                "error": {
                    "index": bridge.pos[0],
                    "step": bridge.pos[1],
                    "call": failure.call,
                    "what": failure.what,
                    "message": failure.message,
                    "traceback": failure.tb,
                },
            }
        except Exception as error:  # a bug of the helper or a malformed message
            reply = {"reckon": PROTOCOL, "error": {"index": 0, "step": -1, "call": "bridge", "what": "threw", "message": "%s: %s" % (type(error).__name__, error), "traceback": _tail(traceback.format_exception(type(error), error, error.__traceback__))}}
        send(reply)
