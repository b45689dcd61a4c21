"""The Qt-free sketch document, its file format and its conversion to a circuit."""
