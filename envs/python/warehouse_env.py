"""The demo warehouse (../warehouse.json) as a Python environment, with two picking policies.

A picking robot leaves one of two docks (D, equally likely) for the packing station (P, +20,
ends the episode). Shelves (#) block the way (a bump costs 0.5); the cross aisle has a coolant
spill (~, the robot slips sideways 30% of the time) beside the forklift lane (=, a safety stop
costs 1.5). Every move costs 0.1; discount 0.97. The same model as the gridworld file, so
`reckon exact` on that file gives the value this environment's episodes estimate.

Invented numbers, for demonstrating reckon. Run it with warehouse.json in this folder:

    reckon estimate --env envs/python/warehouse.json --policy envs/picker-careful.json
    reckon estimate --env envs/python/warehouse.json --policy envs/python/careful.json
"""

import random

from reckon_bridge import serve

LAYOUT = [
    "..........",
    ".##.##.##.",
    "D##.##.##.",
    "D..~~~~..P",
    "==========",
    ".##.##.##.",
    "..........",
]
ACTIONS = ["up", "down", "left", "right"]
MOVES = [(-1, 0), (1, 0), (0, -1), (0, 1)]
# The two moves at right angles to each action: where a slip sends the robot.
PERPENDICULAR = [(2, 3), (2, 3), (0, 1), (0, 1)]


class Warehouse:
    actions = ACTIONS
    discount = 0.97
    # A step pays between -1.6 (into the lane) and 19.9 (onto the packing station); from these
    # reckon derives the horizon, as it does for the gridworld file.
    reward_bounds = (-1.6, 19.9)

    def __init__(self, options):
        self.slip = float(options.get("slip", 0.3))
        self.step_reward = float(options.get("step_reward", -0.1))
        self.bump_reward = float(options.get("bump_reward", -0.5))
        self.lane_reward = float(options.get("lane_reward", -1.5))
        self.goal_reward = float(options.get("goal_reward", 20))
        self.docks = [(r, c) for r, row in enumerate(LAYOUT) for c, ch in enumerate(row) if ch == "D"]
        self.cell = self.docks[0]
        self.rng = random.Random(0)

    def reset(self, seed=None):
        # Every draw of the episode comes from this generator, seeded by reckon.
        self.rng = random.Random(seed)
        self.cell = self.docks[int(self.rng.random() * len(self.docks))]
        return self.cell, {}

    def step(self, action):
        row, col = self.cell
        u = self.rng.random()
        if LAYOUT[row][col] == "~" and u >= 1 - self.slip:
            action = PERPENDICULAR[action][0 if u < 1 - self.slip / 2 else 1]
        r, c = row + MOVES[action][0], col + MOVES[action][1]
        if not (0 <= r < len(LAYOUT) and 0 <= c < len(LAYOUT[0])) or LAYOUT[r][c] == "#":
            return self.cell, self.step_reward + self.bump_reward, False, False, {}
        self.cell = (r, c)
        cell = LAYOUT[r][c]
        reward = self.step_reward + (self.lane_reward if cell == "=" else self.goal_reward if cell == "P" else 0.0)
        return self.cell, reward, cell == "P", False, {}

    def state_name(self, cell):
        return "%d,%d" % cell


# The careful route of ../picker-careful.json: up the dock column, along the clean top aisle,
# down the last column; uniform in the cells it does not list.
CAREFUL = {
    (0, 0): 3, (0, 1): 3, (0, 2): 3, (0, 3): 3, (0, 4): 3, (0, 5): 3, (0, 6): 3, (0, 7): 3, (0, 8): 3, (0, 9): 1,
    (1, 0): 0, (1, 3): 0, (1, 6): 0, (1, 9): 1,
    (2, 0): 0, (2, 3): 0, (2, 6): 0, (2, 9): 1,
    (3, 0): 0, (3, 1): 2, (3, 2): 2, (3, 3): 0, (3, 4): 2, (3, 5): 3, (3, 6): 0, (3, 7): 3, (3, 8): 3,
    (4, 0): 0, (4, 1): 0, (4, 2): 0, (4, 3): 0, (4, 4): 0, (4, 5): 0, (4, 6): 0, (4, 7): 0, (4, 8): 0, (4, 9): 0,
    (5, 0): 0, (5, 3): 0, (5, 6): 0, (5, 9): 0,
    (6, 0): 0, (6, 1): 2, (6, 2): 3, (6, 3): 0, (6, 4): 2, (6, 5): 3, (6, 6): 0, (6, 7): 2, (6, 8): 3, (6, 9): 0,
}

# The direct route of ../picker-direct.json, drawn as arrows over the layout.
DIRECT_ARROWS = [
    "v<>v<>v>>v",
    "v##v##v##v",
    "v##v##v##v",
    ">>>>>>>>>P",
    "^^^^^^^^^^",
    "^##^##^##^",
    "^<>^<>^<>^",
]
DIRECT = {(r, c): "^v<>".index(ch) for r, row in enumerate(DIRECT_ARROWS) for c, ch in enumerate(row) if ch in "^v<>"}


class Route:
    """Follows a route; in a cell the route does not list, or with probability epsilon, a uniform action."""

    def __init__(self, route, actions, epsilon=0.0):
        self.route = route
        self.count = len(actions)
        self.epsilon = epsilon

    def act(self, cell, rng):
        if self.epsilon and rng.random() < self.epsilon:
            return int(rng.random() * self.count)
        action = self.route.get(cell)
        return action if action is not None else int(rng.random() * self.count)

    def probabilities(self, cell):
        """What act draws from: written beside each step by `reckon estimate --record`."""
        action = self.route.get(cell)
        if action is None:
            return [1.0 / self.count] * self.count
        row = [self.epsilon / self.count] * self.count
        row[action] += 1.0 - self.epsilon
        return row


def make_careful(options, actions):
    return Route(CAREFUL, actions, float(options.get("epsilon", 0)))


def make_direct(options, actions):
    return Route(DIRECT, actions, float(options.get("epsilon", 0)))


if __name__ == "__main__":
    serve(Warehouse, policies={"careful": make_careful, "direct": make_direct})
